package plan

import (
	"bytes"
	"encoding/json"
	"os/exec"
	"testing"

	"probity/plan/testkit/needs"
)

// runScipy runs a Python program with Debian's interpreter, feeding it in as
// JSON on stdin and decoding its JSON stdout into out. Without scipy the
// test fails in CI (CI set) and is skipped elsewhere.
func runScipy(t *testing.T, program string, in, out any) {
	t.Helper()
	debianPython := needs.PythonModules(t, "scipy", "numpy")
	data, err := json.Marshal(in)
	if err != nil {
		t.Fatal(err)
	}
	cmd := exec.Command(debianPython, "-c", program)
	cmd.Stdin = bytes.NewReader(data)
	var stdout, stderr bytes.Buffer
	cmd.Stdout, cmd.Stderr = &stdout, &stderr
	if err := cmd.Run(); err != nil {
		t.Fatalf("python reference failed: %v\n%s", err, stderr.String())
	}
	if err := json.Unmarshal(stdout.Bytes(), out); err != nil {
		t.Fatalf("decoding python output: %v\n%s", err, stdout.String())
	}
}
