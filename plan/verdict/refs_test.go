package verdict

import (
	"encoding/json"
	"os"
	"os/exec"
	"strings"
	"testing"
)

// reference runs a script with a reference tool (Debian's /usr/bin/python3
// with scipy and statsmodels, or Rscript with the survey package) and
// decodes the JSON it prints into out. Missing tools fail the test in CI
// and skip it elsewhere.
func reference(t *testing.T, tool string, args []string, script string, out any) {
	t.Helper()
	if _, err := exec.LookPath(tool); err != nil {
		if os.Getenv("CI") != "" {
			t.Fatalf("%s is needed for this test in CI", tool)
		}
		t.Skipf("%s not installed", tool)
	}
	cmd := exec.Command(tool, append(args, script)...)
	data, err := cmd.Output()
	if err != nil {
		msg := ""
		if ee, ok := err.(*exec.ExitError); ok {
			msg = string(ee.Stderr)
		}
		if os.Getenv("CI") == "" && (tool == "Rscript" && strings.Contains(msg, "there is no package called") || tool != "Rscript" && strings.Contains(msg, "No module named")) {
			t.Skipf("%s lacks a module: %s", tool, msg)
		}
		t.Fatalf("%s failed: %v\n%s", tool, err, msg)
	}
	if err := json.Unmarshal(data, out); err != nil {
		t.Fatalf("decoding %s output: %v\n%s", tool, err, data)
	}
}

func python(t *testing.T, script string, out any) {
	reference(t, "/usr/bin/python3", []string{"-c"}, script, out)
}

func rscript(t *testing.T, script string, out any) {
	reference(t, "Rscript", []string{"-e"}, script, out)
}
