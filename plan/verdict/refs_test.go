package verdict

import (
	"encoding/json"
	"os/exec"
	"testing"

	"probity/plan/testkit/needs"
)

// reference runs a script with a reference tool (Debian's /usr/bin/python3
// with scipy and statsmodels, or Rscript with the survey package) and
// decodes the JSON it prints into out. Missing tools fail the test in CI
// and skip it elsewhere.
func reference(t *testing.T, tool string, args []string, script string, out any) {
	t.Helper()
	cmd := exec.Command(tool, append(args, script)...)
	data, err := cmd.Output()
	if err != nil {
		msg := ""
		if ee, ok := err.(*exec.ExitError); ok {
			msg = string(ee.Stderr)
		}
		t.Fatalf("%s failed: %v\n%s", tool, err, msg)
	}
	if err := json.Unmarshal(data, out); err != nil {
		t.Fatalf("decoding %s output: %v\n%s", tool, err, data)
	}
}

func python(t *testing.T, script string, out any) {
	t.Helper()
	reference(t, needs.PythonModules(t, "scipy", "statsmodels"), []string{"-c"}, script, out)
}

func rscript(t *testing.T, script string, out any) {
	t.Helper()
	reference(t, needs.RPackages(t, "survey"), []string{"-e"}, script, out)
}
