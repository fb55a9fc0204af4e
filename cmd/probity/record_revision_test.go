package main

import (
	"path/filepath"
	"strings"
	"testing"
)

// TestRecordRevisionAndCaveats: a re-issued record names the record it
// supersedes and carries its revision on every page; the revision flags
// are checked; a safety use without double labeling says on page 1 that
// label error was not measured.
func TestRecordRevisionAndCaveats(t *testing.T) {
	t.Parallel()
	fx := newRecFixture(t, true, 0)
	labels := fx.labels(t, "labels.csv", nil)
	first := filepath.Join(fx.dir, "rec-1")
	base := []string{"record", "--plan", fx.planPath, "--draw", fx.draw, "--labels", labels, "--date", "2026-12-01"}
	code, stdout, stderr := runProbity(t, append(base, "--out", first, "--use", "safety")...)
	if code == exitBadInput || !strings.Contains(stdout, "caveat: Label error was not measured: no item was given a second, independent label") {
		t.Fatalf("exit %d\n%s%s", code, stdout, stderr)
	}
	page1 := strings.Join(strings.Fields(strings.Split(pdfText(t, filepath.Join(first, "record.pdf")), "\f")[0]), " ")
	if !strings.Contains(page1, "Caveats Label error was not measured") {
		t.Errorf("page 1 lacks the caveat:\n%s", page1)
	}
	old := readRecord(t, first)
	second := filepath.Join(fx.dir, "rec-2")
	code, stdout, stderr = runProbity(t, append(base, "--out", second, "--use", "safety", "--supersedes", old.RecordID)...)
	if code == exitBadInput || !strings.Contains(stdout, "revision 2, superseding record "+old.RecordID) {
		t.Fatalf("exit %d\n%s%s", code, stdout, stderr)
	}
	r := readRecord(t, second)
	if r.Revision != 2 || r.Supersedes != old.RecordID || r.RecordID == old.RecordID {
		t.Errorf("revision %d supersedes %q id %s", r.Revision, r.Supersedes, r.RecordID)
	}
	pages := strings.Split(strings.TrimSuffix(pdfText(t, filepath.Join(second, "record.pdf")), "\f"), "\f")
	for i, p := range pages {
		if !strings.Contains(strings.Join(strings.Fields(p), " "), "Record "+r.RecordID+" · revision 2 · 2026-12-01") {
			t.Errorf("page %d lacks the revision", i+1)
		}
	}
	if !strings.Contains(pages[0], "2, supersedes record") || !strings.Contains(pages[0], old.RecordID) {
		t.Errorf("page 1 does not name the superseded record:\n%s", pages[0])
	}
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--supersedes", "3be241d3d4fc"}, `--supersedes "3be241d3d4fc" is not a record id (32 lowercase hex digits)`},
		{[]string{"--revision", "3"}, "--revision 3 needs --supersedes"},
		{[]string{"--revision", "1", "--supersedes", old.RecordID}, "--revision 1 with --supersedes"},
	} {
		out := filepath.Join(fx.dir, "rec-bad")
		code, _, stderr := runProbity(t, append(append(base, "--out", out), c.args...)...)
		if code != exitBadInput || !strings.Contains(stderr, c.want) || listDir(t, out) != nil {
			t.Errorf("%v: exit %d: %s", c.args, code, stderr)
		}
	}
}
