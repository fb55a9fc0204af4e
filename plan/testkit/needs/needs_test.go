package needs

import (
	"os/exec"
	"strings"
	"testing"
)

// TestTheToolImportsNoTestKit: the packages under plan/testkit serve tests
// only; the probity command does not depend on any of them.
func TestTheToolImportsNoTestKit(t *testing.T) {
	goCmd := Program(t, "go")
	out, err := exec.Command(goCmd, "list", "-deps", "probity/cmd/probity").Output()
	if err != nil {
		t.Fatalf("go list: %v", err)
	}
	for _, pkg := range strings.Fields(string(out)) {
		if strings.HasPrefix(pkg, "probity/plan/testkit/") {
			t.Errorf("probity/cmd/probity depends on %s, which serves tests only", pkg)
		}
	}
}
