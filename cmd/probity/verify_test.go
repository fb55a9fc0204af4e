package main

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"probity/plan/record/signature"
	"probity/sampling/drawfolder"
)

// signedRecord makes a key pair and a signed record of the fixture.
func signedRecord(t *testing.T) (fx *recFixture, rec, labels, pub string) {
	t.Helper()
	fx = newRecFixture(t, true, 0)
	labels = fx.labels(t, "labels.csv", nil)
	key := filepath.Join(fx.dir, "key")
	if code, _, stderr := runProbity(t, "keygen", "--out", key); code != exitOK {
		t.Fatal(stderr)
	}
	rec = filepath.Join(fx.dir, "rec")
	code, stdout, stderr := runProbity(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", labels, "--out", rec,
		"--sign-key", key, "--date", "2026-12-01", "--signoff", writeTemp(t, fx.dir, "signoff.yaml", "reviewed:\n  name: Jörg Þórsson\n  title: Model-risk reviewer\n"))
	if code != exitRejected {
		t.Fatalf("exit %d\n%s%s", code, stdout, stderr)
	}
	if got := strings.Join(listDir(t, rec), ","); got != "record.json,record.pdf,record.sig" {
		t.Fatalf("record folder holds %s", got)
	}
	return fx, rec, labels, key + ".pub"
}

func TestVerifyAllGood(t *testing.T) {
	t.Parallel()
	fx, rec, labels, pub := signedRecord(t)
	code, stdout, stderr := runProbity(t, "verify", rec, "--pub", pub, "--plan", fx.planPath, "--draw", fx.draw, "--labels", labels, "--log", fx.logPath)
	if code != exitOK || stderr != "" {
		t.Fatalf("exit %d\n%s%s", code, stdout, stderr)
	}
	for _, want := range []string{
		"record.json is a canonical record", "recomputes from the content of record.json", "record.json: seal valid (key sha256:", "record.pdf: seal valid",
		"sealed by the trusted key " + pub, "SHA-256 matches the record's plan fingerprint", "labels fingerprint",
		"judgement recomputed from the inputs: every field of record.json agrees",
		"record.json authenticated: sealed by the trusted key " + pub, "not yet signed: prepared, reviewed, approved",
		"chronology in order: plan created 2026-11-30T09:00:00Z (system clock), sample drawn 2026-11-30T15:00:00Z (system clock), record issued 2026-12-01T00:00:00Z (supplied by the operator)",
		"sample drawn again from " + fx.logPath, "record.pdf is exactly the rendering of record.json (a4)", "verified: 15 checks passed\n",
	} {
		if !strings.Contains(stdout, want) {
			t.Errorf("stdout lacks %q:\n%s", want, stdout)
		}
	}
	// Without --pub or --signers nothing vouches for the seal's key: the
	// record is not authenticated, exit 1 (today: "verified", exit 0).
	code, stdout, stderr = runProbity(t, "verify", rec)
	if code != exitRejected || !strings.Contains(stdout, "FAIL  sealed with key sha256:") ||
		!strings.Contains(stdout, "which was not checked: pass --pub KEY.pub or --signers FILE") || strings.Contains(stdout, "verified") {
		t.Errorf("exit %d\n%s%s", code, stdout, stderr)
	}
}

// TestTamperingIsDetected: a changed label, a removed row, an edited
// record.json, a swapped PDF and another key — each detected, naming the
// file and what.
func TestTamperingIsDetected(t *testing.T) {
	t.Parallel()
	fx, rec, _, pub := signedRecord(t)
	copyDir := func(name string) string {
		dst := filepath.Join(fx.dir, name)
		os.Mkdir(dst, 0o755)
		for _, f := range listDir(t, rec) {
			writeFile(t, filepath.Join(dst, f), mustRead(t, filepath.Join(rec, f)))
		}
		return dst
	}
	// The first sample item's label flipped.
	changed := fx.labels(t, "changed.csv", func(r []drawfolder.WorksheetRow) []drawfolder.WorksheetRow {
		r[0].Label = map[string]string{"ok": "defect", "defect": "ok"}[r[0].Label]
		return r
	})
	removed := fx.labels(t, "removed.csv", func(r []drawfolder.WorksheetRow) []drawfolder.WorksheetRow { return append(r[:2:2], r[3:]...) })

	edited := copyDir("edited")
	js := mustRead(t, filepath.Join(edited, "record.json"))
	writeFile(t, filepath.Join(edited, "record.json"), bytes.Replace(js, []byte(`"verdict": "REJECT"`), []byte(`"verdict": "ACCEPT"`), 1))

	swapped := copyDir("swapped")
	other := newRecFixture(t, true, 0)
	otherRec := filepath.Join(other.dir, "rec")
	runProbity(t, "record", "--plan", other.planPath, "--draw", other.draw, "--labels", other.labels(t, "l.csv", nil), "--out", otherRec, "--date", "2026-12-02")
	writeFile(t, filepath.Join(swapped, "record.pdf"), mustRead(t, filepath.Join(otherRec, "record.pdf")))

	unsignedSwap := filepath.Join(fx.dir, "unsigned-swap")
	os.Mkdir(unsignedSwap, 0o755)
	writeFile(t, filepath.Join(unsignedSwap, "record.json"), mustRead(t, filepath.Join(rec, "record.json")))
	writeFile(t, filepath.Join(unsignedSwap, "record.pdf"), mustRead(t, filepath.Join(otherRec, "record.pdf")))

	// Another key pair (keygen in these tests reads a fixed random stream,
	// so make this one from other bytes).
	otherKey := filepath.Join(fx.dir, "other-key")
	otherPub, _, _ := signature.GenerateKey(bytes.NewReader(bytes.Repeat([]byte{0x11}, 64)))
	otherPEM, _ := signature.MarshalPublic(otherPub)
	writeFile(t, otherKey+".pub", otherPEM)

	cases := []struct {
		name string
		args []string
		want []string
	}{
		{"changed label", []string{rec, "--pub", pub, "--plan", fx.planPath, "--draw", fx.draw, "--labels", changed},
			[]string{"FAIL  " + changed + ": SHA-256", "is not the record's labels fingerprint", "FAIL  record.json differs from the judgement recomputed from the inputs: candidates[0].errors: 0 in the record, 1 recomputed"}},
		{"removed row", []string{rec, "--plan", fx.planPath, "--draw", fx.draw, "--labels", removed},
			[]string{"FAIL  " + removed + ": SHA-256", "FAIL  the inputs do not give a record: " + removed + ": rows differ from the draw's worksheet — a row is missing: item 3"}},
		{"edited record.json", []string{edited, "--pub", pub},
			[]string{"FAIL  record.json has SHA-256", "but record.sig signed", "the file was changed after signing (in " + edited + ")",
				"FAIL  " + filepath.Join(edited, "record.json") + ": record_id"}},
		{"swapped PDF", []string{swapped, "--pub", pub},
			[]string{"FAIL  record.pdf has SHA-256", "the file was changed after signing (in " + swapped + ")"}},
		{"another key", []string{rec, "--pub", otherKey + ".pub"},
			[]string{"FAIL  sealed with key sha256:", "which is not a trusted key (" + otherKey + ".pub)"}},
		{"swapped PDF, unsigned", []string{unsignedSwap},
			[]string{"FAIL  " + filepath.Join(unsignedSwap, "record.pdf") + " is not the rendering of record.json with the built-in wording by this probity version",
				"FAIL  " + filepath.Join(unsignedSwap, "record.sig") + " is missing, but record.json says the record was sealed with sha256:"}},
		{"unsigned but --pub", []string{otherRec, "--pub", pub},
			[]string{"FAIL  " + filepath.Join(otherRec, "record.sig") + " is missing: the record has no operator's seal to check against --pub"}},
		{"unsigned", []string{otherRec},
			[]string{"FAIL  nothing authenticates the record: it carries neither an operator's seal (record.sig) nor people's signatures (signatures.txt)"}},
	}
	for _, c := range cases {
		code, stdout, stderr := runProbity(t, append([]string{"verify"}, c.args...)...)
		if code != exitRejected {
			t.Errorf("%s: exit %d, want 1\n%s%s", c.name, code, stdout, stderr)
		}
		for _, w := range c.want {
			if !strings.Contains(stdout, w) {
				t.Errorf("%s: stdout lacks %q:\n%s", c.name, w, stdout)
			}
		}
		if !strings.HasPrefix(stderr, "probity: verification failed: ") {
			t.Errorf("%s: stderr %q", c.name, stderr)
		}
	}
	// record itself refuses the tampered labels (the removed row): exit 2.
	code, _, stderr := runProbity(t, "record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", removed, "--out", filepath.Join(fx.dir, "again"))
	if code != exitBadInput || !strings.Contains(stderr, "removed.csv: rows differ from the draw's worksheet — a row is missing: item 3") {
		t.Errorf("record on a removed row: exit %d: %s", code, stderr)
	}
}

func TestVerifyUsage(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	cases := []struct {
		args []string
		want string
	}{
		{[]string{"verify"}, "verify needs exactly one record folder"},
		{[]string{"verify", filepath.Join(dir, "none")}, "is not a record folder"},
		{[]string{"verify", dir}, "cannot read " + filepath.Join(dir, "record.json")},
		{[]string{"verify", dir, "--log", "x.csv"}, "--log needs --plan and --draw"},
	}
	for _, c := range cases {
		code, _, stderr := runProbity(t, c.args...)
		if code != exitBadInput || !strings.Contains(stderr, c.want) {
			t.Errorf("%v: exit %d: %s", c.args, code, stderr)
		}
	}
}
