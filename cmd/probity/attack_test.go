package main

import (
	"bytes"
	"crypto/ed25519"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"probity/pdfreport"
	"probity/plan/record"
	"probity/plan/record/signature"
	"probity/sampling/demolog"
)

// The attacks of a forger on a sealed record, each of which today's verify
// passed ("verified", exit 0) before records were authenticated. Each now
// fails, saying what could not be authenticated.

// copyRecordDir copies a record folder.
func copyRecordDir(t *testing.T, src, dst string) string {
	t.Helper()
	if err := os.MkdirAll(dst, 0o755); err != nil {
		t.Fatal(err)
	}
	for _, f := range listDir(t, src) {
		writeFile(t, filepath.Join(dst, f), mustRead(t, filepath.Join(src, f)))
	}
	return dst
}

// forge rewrites the record in dir as a forger would: edit the record,
// recompute its id (the digest is public), write canonical record.json
// and, with render, a matching record.pdf; with key, seal both again.
func forge(t *testing.T, dir string, edit func(*record.Record), render bool, key ed25519.PrivateKey) {
	t.Helper()
	rec, err := record.Decode(mustRead(t, filepath.Join(dir, record.JSONFile)))
	if err != nil {
		t.Fatal(err)
	}
	edit(rec)
	if key != nil {
		rec.SigningKey = signature.Fingerprint(key.Public().(ed25519.PublicKey))
	}
	if rec.RecordID, err = record.ID(rec); err != nil {
		t.Fatal(err)
	}
	js, err := record.Encode(rec)
	if err != nil {
		t.Fatal(err)
	}
	writeFile(t, filepath.Join(dir, record.JSONFile), js)
	pdf := mustRead(t, filepath.Join(dir, record.PDFFile))
	if render {
		if pdf, err = pdfreport.Render(rec, pdfreport.Options{}); err != nil {
			t.Fatal(err)
		}
		writeFile(t, filepath.Join(dir, record.PDFFile), pdf)
	}
	if key != nil {
		writeFile(t, filepath.Join(dir, signature.FileName), signature.Sign(key, map[string][]byte{record.JSONFile: js, record.PDFFile: pdf}).Marshal())
	}
}

// acceptAll turns every verdict into ACCEPT with no errors.
func acceptAll(r *record.Record) {
	for i := range r.Candidates {
		r.Candidates[i].Errors, r.Candidates[i].Verdict = 0, record.Accept
	}
	r.OverallVerdict = record.Accept
}

// expectRefused runs verify and wants exit 1, each of want in stdout, and
// no "verified".
func expectRefused(t *testing.T, name string, args []string, want ...string) {
	t.Helper()
	code, stdout, stderr := runProbity(t, append([]string{"verify"}, args...)...)
	if code != exitRejected || strings.Contains(stdout, "verified") {
		t.Errorf("%s: exit %d, want 1\n%s%s", name, code, stdout, stderr)
	}
	for _, w := range want {
		if !strings.Contains(stdout, w) {
			t.Errorf("%s: stdout lacks %q:\n%s", name, w, stdout)
		}
	}
}

// TestAttackResignedWithAnotherKey: the numbers edited, the id recomputed,
// the PDF rendered again and everything sealed with the forger's own key.
func TestAttackResignedWithAnotherKey(t *testing.T) {
	t.Parallel()
	fx, rec, _, pub := signedRecord(t)
	forged := copyRecordDir(t, rec, filepath.Join(fx.dir, "forged"))
	forge(t, forged, acceptAll, true, keyFrom(0x66))
	expectRefused(t, "trusted key given", []string{forged, "--pub", pub},
		"ok    record id", "ok    "+filepath.Join(forged, "record.json")+": seal valid",
		"FAIL  sealed with key sha256:", "which is not a trusted key ("+pub+")")
	expectRefused(t, "nothing trusted", []string{forged},
		"FAIL  sealed with key sha256:", "which was not checked: pass --pub KEY.pub or --signers FILE")
}

// TestAttackStrippedSealEditedNumberOlderVersion: the seal removed, a
// number edited, the tool version set to an older one (which used to
// switch the PDF comparison off) and the id recomputed; the PDF kept.
func TestAttackStrippedSealEditedNumberOlderVersion(t *testing.T) {
	t.Parallel()
	fx, rec, _, pub := signedRecord(t)
	stripped := copyRecordDir(t, rec, filepath.Join(fx.dir, "stripped"))
	os.Remove(filepath.Join(stripped, signature.FileName))
	forge(t, stripped, func(r *record.Record) {
		acceptAll(r)
		r.SigningKey, r.ToolVersion = "", "0.0.1"
	}, false, nil)
	pdf := filepath.Join(stripped, "record.pdf")
	for name, args := range map[string][]string{"no trust": {stripped}, "trusted key": {stripped, "--pub", pub}} {
		expectRefused(t, name, args, "ok    record id",
			"FAIL  "+pdf+" cannot be authenticated: it is not the rendering of record.json by this probity version (0.1.0-test; the record was made by 0.0.1), and no trusted signature covers it")
	}
	expectRefused(t, "no trust", []string{stripped}, "FAIL  nothing authenticates the record")
	expectRefused(t, "trusted key", []string{stripped, "--pub", pub}, "record.sig is missing: the record has no operator's seal to check against --pub")
}

// TestAttackMadeUpRecordID: a record_id that is not the digest of the
// record, in an unsigned record and in one sealed by the forger.
func TestAttackMadeUpRecordID(t *testing.T) {
	t.Parallel()
	fx := newRecFixture(t, true, 0)
	labels := fx.labels(t, "labels.csv", nil)
	rec := filepath.Join(fx.dir, "rec")
	if code, _, stderr := runProbity(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", labels, "--out", rec, "--date", "2026-12-01"); code == exitBadInput {
		t.Fatal(stderr)
	}
	js := mustRead(t, filepath.Join(rec, "record.json"))
	r, _ := record.Decode(js)
	madeUp := strings.Repeat("0123456789abcdef", 2)
	writeFile(t, filepath.Join(rec, "record.json"), bytes.Replace(js, []byte(r.RecordID), []byte(madeUp), 1))
	expectRefused(t, "unsigned", []string{rec},
		"ok    "+filepath.Join(rec, "record.json")+" is a canonical record (id "+madeUp,
		"FAIL  "+filepath.Join(rec, "record.json")+": record_id "+madeUp+" is not the digest of the record's content", "FAIL  nothing authenticates")
}

// TestDemoKeyNeverAuthenticates: a record sealed with the demo's published
// key is marked a demonstration on every page and never verifies, even
// when its key is passed as trusted.
func TestDemoKeyNeverAuthenticates(t *testing.T) {
	t.Parallel()
	fx := newRecFixture(t, true, 0)
	labels := fx.labels(t, "labels.csv", nil)
	pub, priv, _ := signature.GenerateKey(demolog.ThrowAwayKeySource())
	privPEM, _ := signature.MarshalPrivate(priv)
	pubPEM, _ := signature.MarshalPublic(pub)
	key := filepath.Join(fx.dir, "demo-key")
	writeFile(t, key, privPEM)
	os.Chmod(key, 0o600)
	writeFile(t, key+".pub", pubPEM)
	rec := filepath.Join(fx.dir, "rec")
	code, _, stderr := runProbity(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", labels, "--out", rec, "--date", "2026-12-01", "--sign-key", key)
	if code == exitBadInput || !strings.Contains(stderr, "is a published demonstration key") {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	if r := readRecord(t, rec); !r.Demonstration {
		t.Errorf("a record sealed with the demo key is not marked a demonstration")
	}
	pages := strings.Split(strings.TrimSuffix(pdfText(t, filepath.Join(rec, "record.pdf")), "\f"), "\f")
	for i, p := range pages {
		if !strings.Contains(strings.Join(strings.Fields(p), " "), "DEMONSTRATION — the scenario, organisation and people are invented") {
			t.Errorf("page %d of %d does not say the scenario is invented", i+1, len(pages))
		}
	}
	expectRefused(t, "demo key trusted", []string{rec, "--pub", key + ".pub"},
		"FAIL  sealed with a published demonstration key (sha256:c1de7cd5817f589928f5ec1dd82bd21c57f961f3b9a52ae7732be7cdec415ad8)")
}

// TestDemoKeysArePublished: the keys the demo makes are the ones the
// signature package recognises as published.
func TestDemoKeysArePublished(t *testing.T) {
	t.Parallel()
	pub, _, _ := signature.GenerateKey(demolog.ThrowAwayKeySource())
	if !signature.IsDemoKey(signature.Fingerprint(pub)) {
		t.Errorf("the demo's sealing key is not recognised")
	}
	for _, role := range record.SignoffRoles {
		pub, _, _ := signature.GenerateKey(demolog.SignerKeySource(role))
		if !signature.IsDemoKey(signature.Fingerprint(pub)) {
			t.Errorf("the demo's %s key is not recognised", role)
		}
	}
	other, _, _ := signature.GenerateKey(bytes.NewReader(bytes.Repeat([]byte{1}, 64)))
	if signature.IsDemoKey(signature.Fingerprint(other)) {
		t.Errorf("any key is recognised as a demo key")
	}
}

// TestGuttedTemplatesRefused: wording that drops the numeric rule or the
// safety deferral is refused by record (exit 2, naming the file and what is
// missing, nothing written) and by verify.
func TestGuttedTemplatesRefused(t *testing.T) {
	t.Parallel()
	fx := newRecFixture(t, true, 0)
	labels := fx.labels(t, "labels.csv", nil)
	for file, c := range map[string]struct{ text, want string }{
		"decision-rule.md":  {"The model is accepted.\n", "decision-rule.md: does not state the ceiling ({{.Ceiling}}) for a fixed plan"},
		"caution-safety.md": {"No special cautions apply.\n", "caution-safety.md: lacks the deferral to the applicable codes and standards"},
	} {
		dir := filepath.Join(t.TempDir(), "wording")
		os.Mkdir(dir, 0o755)
		writeFile(t, filepath.Join(dir, file), []byte(c.text))
		out := filepath.Join(fx.dir, "rec-"+file)
		code, _, stderr := runProbity(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", labels, "--out", out,
			"--use", "safety", "--templates", dir)
		if code != exitBadInput || !strings.Contains(stderr, "probity: "+filepath.Join(dir, c.want)) {
			t.Errorf("%s: exit %d: %s", file, code, stderr)
		}
		if listDir(t, out) != nil {
			t.Errorf("%s: a refused record left %v", file, listDir(t, out))
		}
		code, _, stderr = runProbity(t, "verify", fx.dir, "--templates", dir)
		if code != exitBadInput || !strings.Contains(stderr, c.want) {
			t.Errorf("verify %s: exit %d: %s", file, code, stderr)
		}
	}
}

// keyFrom makes a key pair from a fixed byte.
func keyFrom(b byte) ed25519.PrivateKey {
	_, priv, _ := signature.GenerateKey(bytes.NewReader(bytes.Repeat([]byte{b}, 64)))
	return priv
}
