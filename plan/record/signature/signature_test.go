package signature

import (
	"bytes"
	"crypto/ed25519"
	"errors"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"probity/plan/testkit/needs"
)

// fixedRandom is a deterministic stream for key generation in tests.
func fixedRandom() *bytes.Reader { return bytes.NewReader(bytes.Repeat([]byte{7}, 64)) }

func TestKeysRoundTrip(t *testing.T) {
	pub, priv, err := GenerateKey(fixedRandom())
	if err != nil {
		t.Fatal(err)
	}
	privPEM, err := MarshalPrivate(priv)
	if err != nil {
		t.Fatal(err)
	}
	pubPEM, err := MarshalPublic(pub)
	if err != nil {
		t.Fatal(err)
	}
	p2, err := ParsePrivate(privPEM, "k")
	if err != nil {
		t.Fatal(err)
	}
	if !p2.Equal(priv) {
		t.Errorf("private key changed in the round trip")
	}
	q2, err := ParsePublic(pubPEM, "k.pub")
	if err != nil {
		t.Fatal(err)
	}
	if !q2.Equal(pub) {
		t.Errorf("public key changed in the round trip")
	}
	if _, err := ParsePublic(privPEM, "k"); !errors.Is(err, ErrKey) || !strings.Contains(err.Error(), `"PRIVATE KEY"`) {
		t.Errorf("a private key read as public: %v", err)
	}
	if _, err := ParsePrivate([]byte("hello"), "k"); !errors.Is(err, ErrKey) {
		t.Errorf("garbage read as a key: %v", err)
	}
	fp := Fingerprint(pub)
	if !strings.HasPrefix(fp, "sha256:") || len(fp) != 7+64 {
		t.Errorf("fingerprint %q has the wrong shape", fp)
	}
}

func TestSignVerifyAndTamper(t *testing.T) {
	_, priv, _ := GenerateKey(fixedRandom())
	files := map[string][]byte{"record.pdf": []byte("%PDF-1.4 ..."), "record.json": []byte("{\"a\": 1}\n")}
	s := Sign(priv, files)
	data := s.Marshal()
	back, err := Parse(data, FileName)
	if err != nil {
		t.Fatalf("%v\n%s", err, data)
	}
	if !bytes.Equal(back.Marshal(), data) {
		t.Errorf("parse/marshal is not lossless")
	}
	if got := strings.Join(back.Names(), ","); got != "record.json,record.pdf" {
		t.Errorf("names %s, want sorted", got)
	}
	for n, d := range files {
		if err := back.Verify(n, d); err != nil {
			t.Errorf("%s: %v", n, err)
		}
	}
	cases := []struct {
		name, file string
		data       []byte
		want       string
	}{
		{"edited json", "record.json", []byte("{\"a\": 2}\n"), "record.json has SHA-256"},
		{"swapped pdf", "record.pdf", []byte("%PDF-1.4 other"), "record.pdf has SHA-256"},
		{"unsigned file", "other.txt", []byte("x"), "other.txt is not signed"},
	}
	for _, c := range cases {
		err := back.Verify(c.file, c.data)
		if !errors.Is(err, ErrMismatch) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: got %v, want an ErrMismatch containing %q", c.name, err, c.want)
		}
	}
	// A signature that is valid for another key: replace the key (and its
	// fingerprint) but keep the signatures.
	pub2, _, _ := GenerateKey(bytes.NewReader(bytes.Repeat([]byte{9}, 64)))
	forged := &Sig{PublicKey: pub2, Files: back.Files}
	if err := forged.Verify("record.json", files["record.json"]); !errors.Is(err, ErrMismatch) || !strings.Contains(err.Error(), "not valid for key") {
		t.Errorf("a signature under another key verified: %v", err)
	}
}

func TestParseErrorsNameTheLine(t *testing.T) {
	_, priv, _ := GenerateKey(fixedRandom())
	good := string(Sign(priv, map[string][]byte{"record.json": []byte("x")}).Marshal())
	lines := strings.Split(good, "\n")
	cases := map[string]struct {
		text, want string
	}{
		"wrong header":      {strings.Replace(good, Header, "probity-signature-v9", 1), "line 1"},
		"other algorithm":   {strings.Replace(good, "algorithm: ed25519", "algorithm: rsa", 1), "line 2"},
		"fingerprint off":   {strings.Replace(good, lines[3], "key-fingerprint: sha256:00", 1), "line 4"},
		"no file":           {strings.Join(lines[:4], "\n") + "\n", "no file is signed"},
		"short signature":   {strings.TrimSuffix(good, "\n")[:len(good)-10] + "\n", "line 5"},
		"file listed twice": {good + lines[4] + "\n", "listed twice"},
	}
	for name, c := range cases {
		_, err := Parse([]byte(c.text), FileName)
		if !errors.Is(err, ErrSigFile) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: got %v, want ErrSigFile containing %q", name, err, c.want)
		}
	}
}

// TestOpenSSLVerifiesSignature checks the key and signature formats with an
// independent implementation: OpenSSL's pkeyutl (Ed25519 over the raw
// message of Message).
func TestOpenSSLVerifiesSignature(t *testing.T) {
	openssl := needs.Program(t, "openssl")
	pub, priv, _ := GenerateKey(fixedRandom())
	dir := t.TempDir()
	pubPEM, _ := MarshalPublic(pub)
	privPEM, _ := MarshalPrivate(priv)
	data := []byte("{\"verdict\": \"ACCEPT\"}\n")
	s := Sign(priv, map[string][]byte{"record.json": data})
	write := func(name string, b []byte) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, b, 0o600); err != nil {
			t.Fatal(err)
		}
		return p
	}
	pubPath, privPath := write("k.pub", pubPEM), write("k", privPEM)
	msg := write("msg", Message("record.json", data))
	sig := write("sig", s.Files[0].Signature)
	out, err := exec.Command(openssl, "pkeyutl", "-verify", "-pubin", "-inkey", pubPath, "-rawin", "-in", msg, "-sigfile", sig).CombinedOutput()
	if err != nil || !strings.Contains(string(out), "Signature Verified Successfully") {
		t.Errorf("openssl did not verify the signature: %v\n%s", err, out)
	}
	// And OpenSSL reads the private key file and derives the same public key.
	out, err = exec.Command(openssl, "pkey", "-in", privPath, "-pubout").CombinedOutput()
	if err != nil || string(out) != string(pubPEM) {
		t.Errorf("openssl derives another public key: %v\n%s\nwant\n%s", err, out, pubPEM)
	}
	if !ed25519.Verify(pub, Message("record.json", data), s.Files[0].Signature) {
		t.Errorf("signature does not verify in Go")
	}
}
