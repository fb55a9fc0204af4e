package drawfolder

import (
	"os/exec"
	"strings"
	"testing"

	"probity/plan/testkit/needs"
)

// goList runs `go list -deps -f FORMAT PKG…` in the module and returns its
// lines. The go command is an outside tool here: missing, the test fails
// under CI and is skipped otherwise.
func goList(t *testing.T, format string, pkgs ...string) []string {
	t.Helper()
	goCmd := needs.Program(t, "go")
	cmd := exec.Command(goCmd, append([]string{"list", "-deps", "-f", format}, pkgs...)...)
	var stderr strings.Builder
	cmd.Stderr = &stderr
	out, err := cmd.Output()
	if err != nil {
		t.Fatalf("go list: %v\n%s", err, stderr.String())
	}
	return strings.Split(strings.TrimSpace(string(out)), "\n")
}

// TestReadersOfTheFolderStayLight: the packages that read a draw folder to
// judge it (this one, the agreement of double labels, progress and the
// record's intake checks) link neither the log reader (probity/sampling),
// nor gzip (the standard library's or klauspost's), nor any of probity's
// assembly: computing Cohen's kappa must not pull in the draw.
func TestReadersOfTheFolderStayLight(t *testing.T) {
	readers := []string{"probity/sampling/drawfolder", "probity/plan/agreement", "probity/plan/progress", "probity/plan/record/intake"}
	for _, line := range goList(t, "{{.ImportPath}} {{len .SFiles}}", readers...) {
		path, nAsm, _ := strings.Cut(line, " ")
		switch {
		case path == "probity/sampling", strings.HasPrefix(path, "github.com/klauspost/"), path == "compress/gzip":
			t.Errorf("%s is among the dependencies of %s", path, strings.Join(readers, ", "))
		case strings.HasPrefix(path, "probity/") && nAsm != "0":
			t.Errorf("%s (assembly: %s files) is among the dependencies of %s", path, nAsm, strings.Join(readers, ", "))
		}
	}
}
