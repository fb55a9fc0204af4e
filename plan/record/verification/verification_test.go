package verification

import (
	"errors"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"probity/plan/inputerr"
	"probity/plan/record"
	"probity/plan/testkit/needs"
)

// The whole of Verify runs in the verify command's tests on records made
// by the record command; these cover what needs no record.

func TestNoRecordFolder(t *testing.T) {
	dir := t.TempDir()
	for _, d := range []string{filepath.Join(dir, "none"), dir} {
		_, err := Verify(Input{Dir: d})
		if !errors.Is(err, ErrNoRecord) || !inputerr.Is(err) {
			t.Errorf("%s: %v, want an input error wrapping ErrNoRecord", d, err)
		}
	}
	// record.json that is not a record: a failed check, not an error.
	os.WriteFile(filepath.Join(dir, record.JSONFile), []byte("{}"), 0o644)
	rep, err := Verify(Input{Dir: dir})
	if err != nil || len(rep.Checks) == 0 || rep.Checks[0].Name != CheckRecord || rep.Checks[0].Status != Failed {
		t.Fatalf("%v %+v", err, rep)
	}
}

// Without names from the caller, a check says what to give in words, never
// a flag.
func TestWordingWithoutNames(t *testing.T) {
	dir := t.TempDir()
	os.WriteFile(filepath.Join(dir, record.JSONFile), []byte("{}"), 0o644)
	rep, err := Verify(Input{Dir: dir})
	if err != nil {
		t.Fatal(err)
	}
	var n Names
	for _, s := range []string{n.trustedKey(), n.templates(), n.plan(), n.draw(), n.labels(), n.log(), n.second(), n.adjudications()} {
		if strings.Contains(s, "-") {
			t.Errorf("default name %q looks like a flag", s)
		}
	}
	for _, c := range rep.Checks {
		if strings.Contains(c.Detail, "--") {
			t.Errorf("check %q names a flag: %s", c.Name, c.Detail)
		}
	}
}

func TestDiff(t *testing.T) {
	a := &record.Record{Format: record.Format, RecordID: "x", Candidates: []record.Candidate{{Name: "m", Errors: 3, Estimate: 0.1}}}
	b := *a
	b.Candidates = []record.Candidate{{Name: "m", Errors: 3, Estimate: 0.1 * (1 + 1e-12)}}
	if d, err := Diff(a, &b); err != nil || len(d) != 0 {
		t.Errorf("within tolerance: %v %v", d, err)
	}
	b.Candidates = []record.Candidate{{Name: "m", Errors: 4, Estimate: 0.1}}
	d, err := Diff(a, &b)
	if err != nil || len(d) != 1 || d[0] != "candidates[0].errors: 3 in the record, 4 recomputed" {
		t.Errorf("one difference: %q %v", d, err)
	}
}

// A difference quotes the record's text as it reads, never with JSON's
// escapes (issue 16 item 14: "defect_score\u003e=0.35").
func TestDiffShowsNoJSONEscapes(t *testing.T) {
	a := &record.Record{Format: record.Format, RecordID: "x", Candidates: []record.Candidate{{Name: "score>=0.5", Reason: "3 errors <= c & more"}}}
	b := *a
	b.Candidates = []record.Candidate{{Name: "score>=0.6", Reason: "4 errors > c"}}
	d, err := Diff(a, &b)
	if err != nil || len(d) != 2 {
		t.Fatalf("%q %v", d, err)
	}
	want := []string{`candidates[0].name: "score>=0.5" in the record, "score>=0.6" recomputed`,
		`candidates[0].reason: "3 errors <= c & more" in the record, "4 errors > c" recomputed`}
	for i := range want {
		if d[i] != want[i] {
			t.Errorf("got  %s\nwant %s", d[i], want[i])
		}
	}
}

// TestNothingBelowTheCommandImportsVerification: the verification calls
// pdfreport, plan, plan/record and sampling; none of them, nor any other
// package but the command, may depend on it.
func TestNothingBelowTheCommandImportsVerification(t *testing.T) {
	goCmd := needs.Program(t, "go")
	const self = "probity/plan/record/verification"
	out, err := exec.Command(goCmd, "list", "-f", `{{.ImportPath}}{{range .Deps}} {{.}}{{end}}`, "probity/...").Output()
	if err != nil {
		t.Fatalf("go list: %v", err)
	}
	for _, line := range strings.Split(strings.TrimSpace(string(out)), "\n") {
		f := strings.Fields(line)
		if f[0] == self || f[0] == "probity/cmd/probity" {
			continue
		}
		for _, dep := range f[1:] {
			if dep == self {
				t.Errorf("%s depends on %s", f[0], self)
			}
		}
	}
}
