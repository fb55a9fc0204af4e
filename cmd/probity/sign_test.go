package main

import (
	"bytes"
	"crypto/ed25519"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"probity/plan/record"
	"probity/plan/record/signature"
	"probity/plan/testkit/needs"
	"probity/sampling/demolog"
)

// runProbityWith runs a command line like runProbity, with a clock and an
// environment of its own.
func runProbityWith(t *testing.T, now time.Time, env map[string]string, args ...string) (int, string, string) {
	t.Helper()
	return runTest(t, args, atTime(now), withEnv(env))
}

// writeKey writes a private key (protected when pass is not empty) and its
// public key, and returns the private key's path.
func writeKey(t *testing.T, path string, priv ed25519.PrivateKey, pass string) string {
	t.Helper()
	var data []byte
	var err error
	if pass != "" {
		data, err = signature.MarshalProtected(priv, []byte(pass))
	} else {
		data, err = signature.MarshalPrivate(priv)
	}
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(path, data, 0o600); err != nil {
		t.Fatal(err)
	}
	pub, _ := signature.MarshalPublic(priv.Public().(ed25519.PublicKey))
	writeFile(t, path+".pub", pub)
	return path
}

func fpOf(priv ed25519.PrivateKey) string {
	return signature.Fingerprint(priv.Public().(ed25519.PublicKey))
}

// signedByPeople is a sealed record and the keys and signers file of the
// three people who sign it.
type signedByPeople struct {
	fx                      *recFixture
	rec, opPub, signers     string
	prepKey, revKey, appKey string
	passFile                string
}

// newSignedByPeople makes a sealed record whose sign-off names a preparer
// and a reviewer (the approver is unnamed), the people's keys (the
// reviewer's protected by a passphrase) and the signers file.
func newSignedByPeople(t *testing.T) *signedByPeople {
	t.Helper()
	s := &signedByPeople{fx: newRecFixture(t, true, 0)}
	dir := s.fx.dir
	op := writeKey(t, filepath.Join(dir, "operator"), keyFrom(0x31), "")
	s.opPub = op + ".pub"
	s.prepKey = writeKey(t, filepath.Join(dir, "prep"), keyFrom(0x32), "")
	s.revKey = writeKey(t, filepath.Join(dir, "rev"), keyFrom(0x33), "correct horse battery")
	s.appKey = writeKey(t, filepath.Join(dir, "app"), keyFrom(0x34), "")
	s.passFile = writeTemp(t, dir, "pass.txt", "correct horse battery\n")
	s.signers = writeTemp(t, dir, "signers.yaml", "signers:\n"+
		"  - name: Dana Exämple\n    roles: [prepared]\n    key: "+fpOf(keyFrom(0x32))+"\n"+
		"  - name: Jörg Þórsson\n    roles: [reviewed]\n    key: "+fpOf(keyFrom(0x33))+"\n"+
		"  - name: Sam Approver\n    roles: [approved]\n    key: "+fpOf(keyFrom(0x34))+"\n"+
		"  - name: Audit operations\n    roles: [operator]\n    key: "+fpOf(keyFrom(0x31))+"\n")
	signoff := writeTemp(t, dir, "signoff.yaml", "prepared:\n  name: Dana Exämple\n  title: Audit engineer\n  date: 2026-12-01\n"+
		"reviewed:\n  name: Jörg Þórsson\n  title: Model-risk reviewer\napproved:\n  title: Head of quality\n")
	s.rec = filepath.Join(dir, "rec")
	code, stdout, stderr := runProbity(t, "record", "--plan", s.fx.planPath, "--draw", s.fx.draw, "--labels", s.fx.labels(t, "labels.csv", nil),
		"--out", s.rec, "--date", "2026-12-01", "--signoff", signoff, "--sign-key", op)
	if code == exitBadInput || code == exitInternal {
		t.Fatalf("record: exit %d\n%s%s", code, stdout, stderr)
	}
	if !strings.Contains(stderr, "is stored in the clear") {
		t.Errorf("no warning about the clear operator key: %q", stderr)
	}
	return s
}

var signTime = time.Date(2026, 12, 1, 12, 0, 0, 0, time.UTC)

func TestSignChainVerifyAndPDF(t *testing.T) {
	t.Parallel()
	s := newSignedByPeople(t)
	code, stdout, stderr := runProbityWith(t, signTime, nil, "sign", s.rec, "--role", "prepared", "--key", s.prepKey, "--signers", s.signers)
	if code != exitOK || !strings.Contains(stdout, "as prepared: Dana Exämple, 2026-12-01 12:00:00 UTC, key "+fpOf(keyFrom(0x32))) ||
		!strings.Contains(stdout, "not yet signed: reviewed, approved") || !strings.Contains(stderr, "is stored in the clear") {
		t.Fatalf("sign prepared: exit %d\n%s%s", code, stdout, stderr)
	}
	code, stdout, stderr = runProbityWith(t, signTime.Add(time.Hour), nil, "sign", s.rec, "--role", "reviewed", "--key", s.revKey,
		"--passphrase-file", s.passFile, "--signers", s.signers)
	if code != exitOK || strings.Contains(stderr, "in the clear") {
		t.Fatalf("sign reviewed: exit %d\n%s%s", code, stdout, stderr)
	}
	// Verified with the seal trusted and the people's keys from the signers
	// file; the approver has not signed yet, which verify says but does not
	// hold against the record.
	later := signTime.Add(24 * time.Hour)
	code, stdout, stderr = runProbityWith(t, later, nil, "verify", s.rec, "--pub", s.opPub, "--signers", s.signers)
	for _, want := range []string{
		"ok    signature 1: Dana Exämple signed as prepared on 2026-12-01 12:00:00 UTC, with key " + fpOf(keyFrom(0x32)) + " (" + s.signers + " line 2)",
		"ok    signature 2: Jörg Þórsson signed as reviewed on 2026-12-01 13:00:00 UTC",
		"record.pdf is exactly the rendering of record.json and its 2 signatures (a4)",
		"ok    the seal's record.pdf is the rendering of record.json as issued, before the people's signatures",
		"signed: prepared by Dana Exämple, reviewed by Jörg Þórsson; not yet signed: approved",
		"verified: ",
	} {
		if !strings.Contains(stdout, want) {
			t.Errorf("verify lacks %q (exit %d):\n%s%s", want, code, stdout, stderr)
		}
	}
	if code != exitOK {
		t.Errorf("verify: exit %d", code)
	}
	// The approver signs under a name they give (the sign-off names none),
	// the passphrase... of a clear key is not asked.
	code, stdout, stderr = runProbityWith(t, signTime.Add(2*time.Hour), nil, "sign", s.rec, "--role", "approved", "--key", s.appKey, "--name", " Sam Approver ")
	if code != exitOK || !strings.Contains(stdout, "every role is signed") || !strings.Contains(stderr, "was not checked against a signers file") {
		t.Fatalf("sign approved: exit %d\n%s%s", code, stdout, stderr)
	}
	text := strings.Join(strings.Fields(pdfText(t, filepath.Join(s.rec, "record.pdf"))), " ")
	for _, want := range []string{
		"Signed electronically by Dana Exämple on 2026-12-01 12:00:00 UTC",
		"Signed electronically by Jörg Þórsson on 2026-12-01 13:00:00 UTC Role signed: reviewed; signature 2 in signatures.txt",
		"Signed electronically by Sam Approver on 2026-12-01 14:00:00 UTC",
		"Signer's key: " + fpOf(keyFrom(0x34)),
		"Intended signer, from the sign-off file (not a signature) none named",
	} {
		if !strings.Contains(text, want) {
			t.Errorf("record.pdf lacks %q", want)
		}
	}
	if strings.Contains(text, "Electronic signature NOT SIGNED") {
		t.Errorf("a signed role still reads NOT SIGNED")
	}
	code, stdout, _ = runProbityWith(t, later, nil, "verify", s.rec, "--pub", s.opPub, "--signers", s.signers)
	if code != exitOK || !strings.Contains(stdout, "and its 3 signatures") {
		t.Errorf("verify after three signatures: exit %d\n%s", code, stdout)
	}
	// Without the signers file the people's keys are not vouched for.
	expectRefused(t, "no signers file", []string{s.rec, "--pub", s.opPub},
		"FAIL  signature 1: Dana Exämple signed as prepared on 2026-12-01 12:00:00 UTC — with key "+fpOf(keyFrom(0x32))+", which was not checked: pass --signers FILE")
	// The signers file alone vouches for the operator's seal too.
	if code, stdout, _ := runProbityWith(t, later, nil, "verify", s.rec, "--signers", s.signers); code != exitOK || !strings.Contains(stdout, "sealed by Audit operations, an operator in "+s.signers) {
		t.Errorf("verify with the signers file alone: exit %d\n%s", code, stdout)
	}
	// A signers file that gives the reviewer's key another role.
	swapped := writeTemp(t, s.fx.dir, "swapped.yaml", strings.Replace(string(mustRead(t, s.signers)), "roles: [reviewed]", "roles: [prepared]", 1))
	expectRefused(t, "another role", []string{s.rec, "--signers", swapped}, "Jörg Þórsson (key "+fpOf(keyFrom(0x33))+") may sign as prepared in "+swapped+" (line 5), not as reviewed")

	// The people's signatures tampered with.
	sigs := mustRead(t, filepath.Join(s.rec, signature.SignaturesFile))
	blocks := strings.SplitAfterN(string(sigs), "\n\n", 3)
	dropped := copyRecordDir(t, s.rec, filepath.Join(s.fx.dir, "dropped"))
	writeFile(t, filepath.Join(dropped, signature.SignaturesFile), []byte(blocks[0]+blocks[2]))
	expectRefused(t, "first signature removed", []string{dropped, "--signers", s.signers}, "signatures.txt line 4: invalid signatures file: sequence: \"2\" is not 1")
	// A verifier whose clock is behind the signatures: they are dated in
	// its future.
	expectRefused(t, "clock behind", []string{s.rec, "--signers", s.signers}, "FAIL  signature 3: Sam Approver signed as approved on 2026-12-01 14:00:00 UTC — it is dated after this computer's clock (2026-12-01 12:00:00 UTC)")
	renamed := copyRecordDir(t, s.rec, filepath.Join(s.fx.dir, "renamed"))
	writeFile(t, filepath.Join(renamed, signature.SignaturesFile), bytes.Replace(sigs, []byte("signed-at: 2026-12-01T13:00:00Z"), []byte("signed-at: 2026-11-30T13:00:00Z"), 1))
	expectRefused(t, "back-dated", []string{renamed, "--signers", s.signers}, "signature 2 (Jörg Þórsson, reviewed) is not valid for its key", "dated before the record's date 2026-12-01")
	resealed := copyRecordDir(t, s.rec, filepath.Join(s.fx.dir, "resealed"))
	forge(t, resealed, func(r *record.Record) {}, false, keyFrom(0x31))
	expectRefused(t, "sealed again", []string{resealed, "--signers", s.signers}, "the record was sealed again after it was signed")
	edited := copyRecordDir(t, s.rec, filepath.Join(s.fx.dir, "edited"))
	forge(t, edited, acceptAll, false, keyFrom(0x31))
	expectRefused(t, "record edited and sealed again", []string{edited, "--signers", s.signers}, "was made for another record.json")
}

func TestSignRefusals(t *testing.T) {
	t.Parallel()
	s := newSignedByPeople(t)
	if code, _, stderr := runProbityWith(t, signTime, nil, "sign", s.rec, "--role", "prepared", "--key", s.prepKey); code != exitOK {
		t.Fatal(stderr)
	}
	before := mustRead(t, filepath.Join(s.rec, "record.pdf"))
	_, demoPriv, _ := signature.GenerateKey(demolog.SignerKeySource("reviewed"))
	demoKey := writeKey(t, filepath.Join(s.fx.dir, "demo-reviewer"), demoPriv, "")
	edited := copyRecordDir(t, s.rec, filepath.Join(s.fx.dir, "edited"))
	js := mustRead(t, filepath.Join(edited, "record.json"))
	writeFile(t, filepath.Join(edited, "record.json"), bytes.Replace(js, []byte(`"overall_verdict": "REJECT"`), []byte(`"overall_verdict": "ACCEPT"`), 1))
	cases := []struct {
		name string
		now  time.Time
		env  map[string]string
		args []string
		want string
	}{
		{"role twice", signTime, nil, []string{"--role", "prepared", "--key", s.prepKey}, "the role prepared is already signed, by Dana Exämple on 2026-12-01 12:00:00 UTC (signature 1)"},
		{"key of another", signTime, nil, []string{"--role", "approved", "--key", s.prepKey, "--name", "Sam Approver", "--signers", s.signers},
			"key " + fpOf(keyFrom(0x32)) + " belongs to Dana Exämple in " + s.signers + " (line 2), not to Sam Approver"},
		{"no name", signTime, nil, []string{"--role", "approved", "--key", s.appKey}, "the sign-off names no signer for the role approved"},
		{"hidden character", signTime, nil, []string{"--role", "approved", "--key", s.appKey, "--name", "Sam \u202eApprover"}, "U+202E (a right-to-left override)"},
		{"clock before the record", time.Date(2026, 11, 30, 23, 0, 0, 0, time.UTC), nil, []string{"--role", "reviewed", "--key", s.revKey, "--passphrase-file", s.passFile},
			"the clock says 2026-11-30 23:00:00 UTC, before the record's date 2026-12-01"},
		{"wrong passphrase", signTime, map[string]string{passphraseEnv: "wrong horse battery"}, []string{"--role", "reviewed", "--key", s.revKey},
			"the passphrase does not open the key"},
		{"no passphrase, no terminal", signTime, nil, []string{"--role", "reviewed", "--key", s.revKey}, "needs a passphrase, and there is no terminal to ask for it"},
		{"demo key", signTime, nil, []string{"--role", "reviewed", "--key", demoKey, "--name", "X"}, "is a published demonstration key: it signs nothing but demonstration records"},
		{"unknown role", signTime, nil, []string{"--role", "auditor", "--key", s.revKey}, `--role "auditor" is not one of prepared, reviewed, approved`},
	}
	for _, c := range cases {
		code, _, stderr := runProbityWith(t, c.now, c.env, append([]string{"sign", s.rec}, c.args...)...)
		if code != exitBadInput || !strings.Contains(stderr, c.want) {
			t.Errorf("%s: exit %d, want 2 and %q:\n%s", c.name, code, c.want, stderr)
		}
	}
	code, _, stderr := runProbityWith(t, signTime, nil, "sign", edited, "--role", "reviewed", "--key", s.revKey, "--passphrase-file", s.passFile)
	if code != exitBadInput || !strings.Contains(stderr, "record_id") || !strings.Contains(stderr, "the record was edited") {
		t.Errorf("edited record: exit %d: %s", code, stderr)
	}
	if !bytes.Equal(before, mustRead(t, filepath.Join(s.rec, "record.pdf"))) {
		t.Errorf("a refused signature changed record.pdf")
	}
	// The passphrase from the environment opens the key.
	if code, _, stderr := runProbityWith(t, signTime, map[string]string{passphraseEnv: "correct horse battery"}, "sign", s.rec, "--role", "reviewed", "--key", s.revKey); code != exitOK {
		t.Errorf("passphrase from the environment: exit %d: %s", code, stderr)
	}
}

// TestREADMERecipeVerifiesSignature runs the README's recipe — awk,
// base64 and openssl pkeyutl on signatures.txt alone — on a real signed
// record: an Ed25519 implementation independent of probity's verifies the
// exact bytes the README documents, and the key's SHA-256 is the
// fingerprint the signers file lists.
func TestREADMERecipeVerifiesSignature(t *testing.T) {
	t.Parallel()
	for _, tool := range []string{"sh", "awk", "base64", "openssl", "sha256sum"} {
		needs.Program(t, tool)
	}
	s := newSignedByPeople(t)
	for i, role := range []string{"prepared", "reviewed"} {
		key, extra := s.prepKey, []string{}
		if role == "reviewed" {
			key, extra = s.revKey, []string{"--passphrase-file", s.passFile}
		}
		if code, _, stderr := runProbityWith(t, signTime.Add(time.Duration(i)*time.Minute), nil, append([]string{"sign", s.rec, "--role", role, "--key", key}, extra...)...); code != exitOK {
			t.Fatal(stderr)
		}
	}
	// The recipe, as the README prints it (K is the signature's number).
	const recipe = `K=2; F=signatures.txt
awk -v k=$K 'BEGIN{RS=""} NR==k+1{n=split($0,l,"\n"); for(i=1;i<n;i++) print l[i]}' $F > msg
awk -v k=$K 'BEGIN{RS=""} NR==k+1{n=split($0,l,"\n"); sub(/^signature: /,"",l[n]); print l[n]}' $F | base64 -d > sig
awk -v k=$K 'BEGIN{RS=""} NR==k+1{n=split($0,l,"\n"); sub(/^public-key: /,"",l[n-2]); print l[n-2]}' $F | base64 -d > key.raw
{ printf '\060\052\060\005\006\003\053\145\160\003\041\000'; cat key.raw; } > key.der
openssl pkeyutl -verify -pubin -keyform DER -inkey key.der -rawin -in msg -sigfile sig
echo "key sha256:$(sha256sum < key.raw | cut -c1-64)"`
	work := t.TempDir()
	writeFile(t, filepath.Join(work, "signatures.txt"), mustRead(t, filepath.Join(s.rec, "signatures.txt")))
	cmd := exec.Command("sh", "-c", recipe)
	cmd.Dir = work
	out, err := cmd.CombinedOutput()
	if err != nil || !strings.Contains(string(out), "Signature Verified Successfully") || !strings.Contains(string(out), "key "+fpOf(keyFrom(0x33))) {
		t.Fatalf("the README recipe does not verify signature 2: %v\n%s", err, out)
	}
	msg := mustRead(t, filepath.Join(work, "msg"))
	if !bytes.HasPrefix(msg, []byte("probity-signature-manifestation-v1\nsequence: 2\nrecord-id: ")) || !bytes.Contains(msg, []byte("\nrole: reviewed\n")) {
		t.Errorf("the recipe extracted another message:\n%s", msg)
	}
	// One byte changed in the message: OpenSSL refuses it.
	writeFile(t, filepath.Join(work, "msg"), bytes.Replace(msg, []byte("role: reviewed"), []byte("role: approved"), 1))
	cmd = exec.Command("openssl", "pkeyutl", "-verify", "-pubin", "-keyform", "DER", "-inkey", "key.der", "-rawin", "-in", "msg", "-sigfile", "sig")
	cmd.Dir = work
	if out, err := cmd.CombinedOutput(); err == nil {
		t.Errorf("openssl verified an altered message:\n%s", out)
	}
}
