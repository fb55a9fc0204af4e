package main

import (
	"os"
	"path/filepath"
	"slices"
	"testing"

	"github.com/spf13/pflag"

	"probity/sampling/drawfolder"
)

// notPathFlags are the string flags whose values are not paths. With
// pathFlags they name every string flag, so a new flag must be put in one
// or the other: a path flag left out would be read from the process's
// folder instead of deps.dir (the demo's steps).
var notPathFlags = map[string][]string{
	"plan": {"allocation", "anticipated", "budget", "candidate", "candidates", "ceiling", "classes", "confidence", "date", "design", "method",
		"multiplicity", "negative", "population", "positive", "producer-risk", "require", "seed", "system", "system-version",
		"thresholds", "time-column", "rounding", "stratum-anticipated", "stratum-sizes",
		"decisions", "measure", "no-miss-measure-reason", "prevalence", "release"},
	"draw": {"allocation", "band", "date", "days", "dedupe", "format", "id", "period", "show", "max-line", "sql", "strata",
		"table", "time-column", "where", "rounding"},
	"record": {"bound", "date", "paper", "use", "supersedes"},
	"sign":   {"role", "name"},
	"verify": {"max-line"},
	"label":  {"bind"},
	"trend":  {"baseline", "measure", "candidate"},
}

func TestEveryStringFlagIsKnownAsAPathOrNot(t *testing.T) {
	t.Parallel()
	d, _, _ := newTestDeps()
	for _, c := range commands(d) {
		paths, others := pathFlags[c.Name()], notPathFlags[c.Name()]
		for _, name := range append(slices.Clone(paths), others...) {
			if c.Flags().Lookup(name) == nil {
				t.Errorf("%s has no flag --%s", c.Name(), name)
			}
		}
		c.Flags().VisitAll(func(f *pflag.Flag) {
			switch f.Value.Type() {
			case "string", "stringSlice", "stringArray":
			default:
				return
			}
			if slices.Contains(paths, f.Name) == slices.Contains(others, f.Name) {
				t.Errorf("%s --%s: put it in pathFlags (its value is a path) or in notPathFlags", c.Name(), f.Name)
			}
		})
	}
}

func TestTakePathsFrom(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct{ dir, p, want string }{
		{"/w", "a/b.csv", "/w/a/b.csv"},
		{"/w", "/elsewhere/b.csv", "/elsewhere/b.csv"},
		{"/w", "-", "-"},
		{"/w", "../x", "/x"},
	} {
		if got := inFolder(tc.dir, tc.p); got != tc.want {
			t.Errorf("inFolder(%q, %q) = %q, want %q", tc.dir, tc.p, got, tc.want)
		}
	}
	for _, tc := range []struct{ dir, p, want string }{
		{"", "a/b.csv", "a/b.csv"},
		{"/w", "/w/a/b.csv", "a/b.csv"},
		{"/w", "/x/b.csv", "/x/b.csv"},
		{"/w", "-", "-"},
	} {
		if got := (deps{dir: tc.dir}).given(tc.p); got != tc.want {
			t.Errorf("given(%q) in %q = %q, want %q", tc.p, tc.dir, got, tc.want)
		}
	}
}

// TestCommandsTakePathsFromDir runs draw and draw --check inside a folder
// given as deps.dir, with relative paths: the files land there, and the
// manifest records the log's path as typed. (The demo runs every command
// this way.)
func TestCommandsTakePathsFromDir(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	in := withDir(dir)
	log := filepath.Join(dir, "log.csv")
	if err := os.WriteFile(log, mustRead(t, "../../testdata/draw/log-small.csv"), 0o644); err != nil {
		t.Fatal(err)
	}
	plan, err := filepath.Abs(drawPlan)
	if err != nil {
		t.Fatal(err)
	}
	if code, _, stderr := runTest(t, []string{"draw", "--plan", plan, "--log", "log.csv", "--out", "draw"}, in); code != exitOK {
		t.Fatalf("draw: exit %d\n%s", code, stderr)
	}
	m, _, err := drawfolder.ReadManifest(filepath.Join(dir, "draw", drawfolder.ManifestFile))
	if err != nil {
		t.Fatal(err)
	}
	if m.Log.Path != "log.csv" {
		t.Errorf("the manifest records the log as %q, want log.csv", m.Log.Path)
	}
	if code, stdout, stderr := runTest(t, []string{"draw", "--check", "draw", "--plan", plan, "--log", "log.csv"}, in); code != exitOK {
		t.Fatalf("draw --check: exit %d\n%s%s", code, stdout, stderr)
	}
}
