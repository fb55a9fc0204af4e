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
	"time"

	"probity/plan/record"
	"probity/plan/testkit/needs"
)

// keyFrom makes a key pair from a fixed byte.
func keyFrom(b byte) ed25519.PrivateKey {
	_, priv, _ := GenerateKey(bytes.NewReader(bytes.Repeat([]byte{b}, 64)))
	return priv
}

// testID is a record id of the right shape.
var testID = strings.Repeat("0123456789abcdef", 4)[:record.IDLength]

// chainOf signs a chain of people's signatures over recJSON and seal.
func chainOf(t *testing.T, b Binding, who ...string) []Manifestation {
	t.Helper()
	var ms []Manifestation
	at := time.Date(2026, 12, 2, 9, 0, 0, 0, time.UTC)
	for i, role := range who {
		m := Next(ms, b)
		m.Name, m.Role, m.Meaning = "Person "+role, role, "I "+role+" this record."
		m.SignedAt = at.Add(time.Duration(i) * time.Hour)
		m.PDFSHA256 = strings.Repeat("ab", 32)
		m.Sign(keyFrom(byte(10 + i)))
		ms = append(ms, m)
	}
	return ms
}

func TestSignaturesRoundTripAndChain(t *testing.T) {
	b := Binding{RecordJSON: []byte("{\"record\": 1}\n"), RecordID: testID, Seal: []byte("seal")}
	ms := chainOf(t, b, "prepared", "reviewed", "approved")
	data := MarshalSignatures(ms)
	back, err := ParseSignatures(data, SignaturesFile)
	if err != nil {
		t.Fatalf("%v\n%s", err, data)
	}
	if !bytes.Equal(MarshalSignatures(back), data) {
		t.Fatalf("the signatures file does not round-trip")
	}
	if errs := CheckChain(back, b); errs != nil {
		t.Fatalf("a good chain fails: %v", errs)
	}
	if got := back[1].Shown(); got.Name != "Person reviewed" || got.Sequence != 2 || got.KeyFingerprint != Fingerprint(keyFrom(11).Public().(ed25519.PublicKey)) {
		t.Errorf("shown %+v", got)
	}

	edit := func(f func([]Manifestation) []Manifestation) []Manifestation {
		c := append([]Manifestation{}, ms...)
		return f(c)
	}
	cases := []struct {
		name string
		ms   []Manifestation
		b    Binding
		want string
	}{
		{"name edited", edit(func(c []Manifestation) []Manifestation { c[1].Name = "Someone Else"; return c }), b,
			"signature 2 (Someone Else, reviewed) is not valid for its key"},
		{"first removed", ms[1:], b, "signature 2 (Person reviewed, reviewed) is number 1 in the file"},
		{"reordered", []Manifestation{ms[0], ms[2], ms[1]}, b, "does not follow the signature before it"},
		{"another record.json", ms, Binding{RecordJSON: []byte("{\"record\": 2}\n"), RecordID: testID, Seal: b.Seal},
			"was made for another record.json"},
		{"sealed again", ms, Binding{RecordJSON: b.RecordJSON, RecordID: testID, Seal: []byte("another seal")},
			"the record was sealed again after it was signed"},
		{"seal removed", ms, Binding{RecordJSON: b.RecordJSON, RecordID: testID},
			"but the record has no record.sig"},
		{"other id", ms, Binding{RecordJSON: b.RecordJSON, RecordID: strings.Repeat("f", record.IDLength), Seal: b.Seal}, "names record"},
	}
	for _, c := range cases {
		errs := CheckChain(c.ms, c.b)
		var all []string
		for _, e := range errs {
			if !errors.Is(e, ErrMismatch) {
				t.Errorf("%s: %v does not match ErrMismatch", c.name, e)
			}
			all = append(all, e.Error())
		}
		if !strings.Contains(strings.Join(all, "\n"), c.want) {
			t.Errorf("%s: got %q, want one containing %q", c.name, all, c.want)
		}
	}

	// A signer who signs a role twice, or back-dates after the one before.
	twice := chainOf(t, b, "reviewed", "reviewed")
	if errs := CheckChain(twice, b); len(errs) != 1 || !strings.Contains(errs[0].Error(), "which signature 1 already signed") {
		t.Errorf("a role signed twice: %v", errs)
	}
	early := chainOf(t, b, "prepared")
	m := Next(early, b)
	m.Name, m.Role, m.Meaning, m.SignedAt, m.PDFSHA256 = "P", "reviewed", "I reviewed it.", early[0].SignedAt.Add(-time.Minute), strings.Repeat("cd", 32)
	m.Sign(keyFrom(20))
	if errs := CheckChain(append(early, m), b); len(errs) != 1 || !strings.Contains(errs[0].Error(), "before signature 1") {
		t.Errorf("a back-dated signature: %v", errs)
	}
}

func TestParseSignaturesNamesTheLine(t *testing.T) {
	b := Binding{RecordJSON: []byte("{}\n"), RecordID: testID}
	good := string(MarshalSignatures(chainOf(t, b, "reviewed")))
	cases := map[string]struct{ text, want string }{
		"header":        {strings.Replace(good, SignaturesHeader, "probity-signatures-v9", 1), "line 1"},
		"no blank":      {strings.Replace(good, SignaturesHeader+"\n\n", SignaturesHeader+"\nx\n", 1), "line 2: invalid signatures file: a blank line"},
		"role":          {strings.Replace(good, "role: reviewed", "role: auditor", 1), "line 11: invalid signatures file: role: \"auditor\" is not one of prepared, reviewed, approved"},
		"time":          {strings.Replace(good, "T09:00:00Z", "T09:00:00+01:00", 1), "line 13: invalid signatures file: signed-at"},
		"zero width":    {strings.Replace(good, "name: Person reviewed", "name: Person\u200b reviewed", 1), "line 10: invalid signatures file: name: invalid name: character 7 is U+200B"},
		"crlf":          {strings.ReplaceAll(good, "\n", "\r\n"), "line ends"},
		"none previous": {strings.Replace(good, "sequence: 1", "sequence: 2", 1), "line 4: invalid signatures file: sequence"},
		"fingerprint":   {strings.Replace(good, "key-fingerprint: sha256:", "key-fingerprint: sha256:0", 1), "line 15"},
		"truncated":     {good[:len(good)-100] + "\n", "line 16: invalid signatures file: expected \"signature: …\""},
	}
	for name, c := range cases {
		_, err := ParseSignatures([]byte(c.text), SignaturesFile)
		if !errors.Is(err, ErrSignaturesFile) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: got %v, want ErrSignaturesFile containing %q", name, err, c.want)
		}
	}
}

// TestOpenSSLVerifiesManifestation checks a person's signature with an
// independent Ed25519 implementation, OpenSSL's pkeyutl, over exactly the
// bytes Message documents, with the public key rebuilt from the raw bytes
// the signatures file carries (the DER prefix of an Ed25519
// SubjectPublicKeyInfo, RFC 8410, then the 32 bytes).
func TestOpenSSLVerifiesManifestation(t *testing.T) {
	openssl := needs.Program(t, "openssl")
	b := Binding{RecordJSON: []byte("{}\n"), RecordID: testID, Seal: []byte("seal")}
	ms := chainOf(t, b, "prepared", "reviewed")
	dir := t.TempDir()
	write := func(name string, data []byte) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, data, 0o600); err != nil {
			t.Fatal(err)
		}
		return p
	}
	der := append([]byte{0x30, 0x2a, 0x30, 0x05, 0x06, 0x03, 0x2b, 0x65, 0x70, 0x03, 0x21, 0x00}, ms[1].PublicKey...)
	out, err := exec.Command(openssl, "pkeyutl", "-verify", "-pubin", "-keyform", "DER", "-inkey", write("pub.der", der),
		"-rawin", "-in", write("msg", ms[1].Message()), "-sigfile", write("sig", ms[1].Signature)).CombinedOutput()
	if err != nil || !strings.Contains(string(out), "Signature Verified Successfully") {
		t.Errorf("openssl did not verify the signature: %v\n%s", err, out)
	}
	// One byte of the message changed: OpenSSL refuses it too.
	msg := bytes.Replace(ms[1].Message(), []byte("role: reviewed"), []byte("role: approved"), 1)
	out, err = exec.Command(openssl, "pkeyutl", "-verify", "-pubin", "-keyform", "DER", "-inkey", filepath.Join(dir, "pub.der"),
		"-rawin", "-in", write("msg2", msg), "-sigfile", filepath.Join(dir, "sig")).CombinedOutput()
	if err == nil || strings.Contains(string(out), "Signature Verified Successfully") {
		t.Errorf("openssl verified an altered message:\n%s", out)
	}
}

// FuzzParseSignatures: ParseSignatures never panics, and whatever it
// accepts marshals back to the same bytes (one spelling).
func FuzzParseSignatures(f *testing.F) {
	b := Binding{RecordJSON: []byte("{}\n"), RecordID: testID}
	var ms []Manifestation
	m := Next(ms, b)
	m.Name, m.Role, m.Meaning, m.SignedAt, m.PDFSHA256 = "Jörg Þórsson", "reviewed", "I reviewed it.", time.Date(2026, 12, 2, 9, 0, 0, 0, time.UTC), strings.Repeat("ab", 32)
	m.Sign(keyFrom(3))
	good := MarshalSignatures([]Manifestation{m})
	f.Add(good)
	f.Add([]byte(SignaturesHeader + "\n"))
	f.Add(bytes.Replace(good, []byte("name: J"), []byte("name:  J"), 1))
	f.Fuzz(func(t *testing.T, data []byte) {
		ms, err := ParseSignatures(data, SignaturesFile)
		if err != nil {
			return
		}
		if again := MarshalSignatures(ms); !bytes.Equal(again, data) {
			t.Fatalf("accepted input does not round-trip:\n%q\n%q", data, again)
		}
	})
}
