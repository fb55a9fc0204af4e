package plan

import (
	"bytes"
	"encoding/json"
	"os"
	"os/exec"
	"testing"
)

// debianPython is the interpreter that carries python3-scipy (the python3
// first on PATH may be another one).
const debianPython = "/usr/bin/python3"

// runScipy runs a Python program with Debian's interpreter, feeding it in as
// JSON on stdin and decoding its JSON stdout into out. Without scipy the
// test fails in CI (CI set) and is skipped elsewhere.
func runScipy(t *testing.T, program string, in, out any) {
	t.Helper()
	probe := exec.Command(debianPython, "-c", "import scipy.stats, numpy")
	if err := probe.Run(); err != nil {
		if os.Getenv("CI") != "" {
			t.Fatalf("scipy is required in CI: %s -c 'import scipy.stats': %v", debianPython, err)
		}
		t.Skipf("scipy not available (%v); install python3-scipy", err)
	}
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
