package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestWholeFilesAreBounded (issue 16, item 6): a file probity reads whole
// that is a link to /dev/zero is refused at once, naming it; before,
// verify read such a record.json forever.
func TestWholeFilesAreBounded(t *testing.T) {
	t.Parallel()
	if _, err := os.Stat("/dev/zero"); err != nil {
		t.Skip("no /dev/zero")
	}
	dir := t.TempDir()
	rec := filepath.Join(dir, "record.json")
	plan := filepath.Join(dir, "plan.yaml")
	for _, p := range []string{rec, plan} {
		if err := os.Symlink("/dev/zero", p); err != nil {
			t.Fatal(err)
		}
	}
	cases := []struct {
		args []string
		want string
	}{
		{[]string{"verify", dir}, "probity: cannot read " + rec + ": a character device, not a record\nhint: pass the --out folder of probity record\n"},
		{[]string{"draw", "--plan", plan, "--log", "x.csv", "--out", filepath.Join(dir, "out")}, "probity: " + plan + ": a character device, not a plan file\nhint: give the path of the plan file\n"},
	}
	for _, c := range cases {
		code, stdout, stderr := runProbity(t, c.args...)
		if code != exitBadInput || stderr != c.want || stdout != "" {
			t.Errorf("%s: exit %d\n%s%s\nwant\n%s", strings.Join(c.args, " "), code, stdout, stderr, c.want)
		}
	}
	if left := tree(t, dir); len(left) != 2 {
		t.Errorf("left behind: %v", left)
	}
}
