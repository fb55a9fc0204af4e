package sampling

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestReadAnticipated(t *testing.T) {
	dir := t.TempDir()
	good := map[string]string{
		"a.csv":  "stratum,anticipated_error\nnorth|web,0.02\nsouth|app,0.1\n",
		"a.yaml": "\"north|web\": 0.02\nsouth|app: 0.1\n",
	}
	for name, content := range good {
		p := filepath.Join(dir, name)
		os.WriteFile(p, []byte(content), 0o644)
		m, err := ReadAnticipated(p)
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		if len(m) != 2 || m["north|web"] != 0.02 || m["south|app"] != 0.1 {
			t.Fatalf("%s: %v", name, m)
		}
	}
	bad := []struct{ name, content, want string }{
		{"b.csv", "stratum,p\n", `header column 2 is "p", expected "anticipated_error"`},
		{"c.csv", "stratum,anticipated_error\nx,0\n", `c.csv line 2, field anticipated_error: "0" is not a number strictly between 0 and 1`},
		{"d.csv", "stratum,anticipated_error\nx,0.1\nx,0.2\n", `d.csv line 3, field stratum: stratum "x" is listed twice (lines 2 and 3)`},
		{"e.yaml", "x: high\n", `e.yaml line 1, field x: "high" is not a number strictly between 0 and 1`},
		{"f.yaml", "- 1\n", `expected a mapping`},
	}
	for _, b := range bad {
		p := filepath.Join(dir, b.name)
		os.WriteFile(p, []byte(b.content), 0o644)
		_, err := ReadAnticipated(p)
		if err == nil || !strings.Contains(err.Error(), b.want) {
			t.Errorf("%s: error %v, want %q", b.name, err, b.want)
		}
	}
}
