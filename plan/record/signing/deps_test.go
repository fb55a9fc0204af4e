package signing

import (
	"os/exec"
	"strings"
	"testing"

	"probity/plan/testkit/needs"
)

// TestNothingBelowTheCommandImportsSigning: signing renders the PDF
// (pdfreport); no package but the command may depend on it.
func TestNothingBelowTheCommandImportsSigning(t *testing.T) {
	goCmd := needs.Program(t, "go")
	const self = "probity/plan/record/signing"
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
