// Package needs is how a test asks for a tool from outside Go — Debian's
// /usr/bin/python3 with scipy or statsmodels, Rscript with the survey
// package, poppler-utils, openssl, ssh-keygen, the PostgreSQL and
// ClickHouse programs, chromium, the go command, the shell tools of a
// documented recipe — as a reference or a driver.
//
// A missing tool skips the test on a developer's machine and fails it when
// the CI environment variable is set, so CI cannot pass without the
// cross-checks. Either way the message names the Debian package that
// provides the tool.
//
// It serves tests only (testkit): probity itself never imports it.
package needs

import (
	"bytes"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"
	"testing"
)

// Python is Debian's interpreter, the one the reference scripts run under
// (its modules come from Debian's python3-* packages).
const Python = "/usr/bin/python3"

// debianPackage names the Debian package of each program the tests call.
var debianPackage = map[string]string{
	"python3":           "python3",
	"Rscript":           "r-base-core",
	"pdftotext":         "poppler-utils",
	"pdftoppm":          "poppler-utils",
	"pdfinfo":           "poppler-utils",
	"openssl":           "openssl",
	"psql":              "postgresql-client",
	"initdb":            "postgresql",
	"pg_ctl":            "postgresql",
	"chromium":          "chromium",
	"clickhouse-server": "clickhouse-server",
	"clickhouse-client": "clickhouse-client",
	"go":                "golang-go",
	"ssh-keygen":        "openssh-client",
	"sh":                "dash",
	"sed":               "sed",
	"awk":               "mawk",
	"sha256sum":         "coreutils",
	"cut":               "coreutils",
	"base64":            "coreutils",
}

// pythonPackage names the Debian package of each Python module.
var pythonPackage = map[string]string{
	"numpy":       "python3-numpy",
	"scipy":       "python3-scipy",
	"statsmodels": "python3-statsmodels",
}

// Missing stops the test because something it needs is absent: under CI
// (the CI environment variable set) it fails, elsewhere it skips. what
// says what is missing; pkg is the Debian package that provides it.
func Missing(t testing.TB, what, pkg string) {
	t.Helper()
	msg := fmt.Sprintf("%s is not available (Debian package %s)", what, pkg)
	if os.Getenv("CI") != "" {
		t.Fatalf("%s; CI requires it", msg)
	}
	t.Skip(msg + "; the test is skipped (it fails under CI)")
}

// Program returns the path of a program the test runs: name is looked up
// in PATH, then in /usr/sbin (where Debian installs servers, and which a
// non-root PATH may lack), or taken as it is when it is a path. A program
// not listed in this package is a mistake of the test.
func Program(t testing.TB, name string) string {
	t.Helper()
	pkg, ok := debianPackage[filepath.Base(name)]
	if !ok {
		t.Fatalf("needs: no Debian package known for %q; add it to debianPackage", name)
	}
	path, err := exec.LookPath(name)
	if err != nil && !strings.ContainsRune(name, filepath.Separator) {
		path, err = exec.LookPath(filepath.Join("/usr/sbin", name))
	}
	if err != nil {
		Missing(t, name, pkg)
	}
	return path
}

// PythonModules returns Debian's /usr/bin/python3 once it imports every
// module given (none: the interpreter alone).
func PythonModules(t testing.TB, modules ...string) string {
	t.Helper()
	if _, err := os.Stat(Python); err != nil {
		Missing(t, Python, "python3")
	}
	if len(modules) == 0 {
		return Python
	}
	var imports strings.Builder
	for _, m := range modules {
		pkg, ok := pythonPackage[m]
		if !ok {
			t.Fatalf("needs: no Debian package known for the Python module %q; add it to pythonPackage", m)
		}
		fmt.Fprintf(&imports, "try:\n    import %s\nexcept ImportError:\n    print(%q)\n", m, pkg)
	}
	missing, err := probe(imports.String(), func() ([]byte, error) { return exec.Command(Python, "-c", imports.String()).Output() })
	if err != nil {
		t.Fatalf("needs: %s could not check its modules: %v", Python, err)
	}
	if len(missing) > 0 {
		Missing(t, "Python modules "+strings.Join(modules, ", ")+" under "+Python, strings.Join(missing, ", "))
	}
	return Python
}

// RPackages returns the path of Rscript once it loads every R package
// given (Debian's r-cran-NAME).
func RPackages(t testing.TB, packages ...string) string {
	t.Helper()
	rscript := Program(t, "Rscript")
	var script strings.Builder
	for _, p := range packages {
		fmt.Fprintf(&script, "if (!requireNamespace(%q, quietly = TRUE)) cat(%q, \"\\n\")\n", p, "r-cran-"+strings.ToLower(p))
	}
	if script.Len() == 0 {
		return rscript
	}
	missing, err := probe(script.String(), func() ([]byte, error) {
		var stderr bytes.Buffer
		cmd := exec.Command(rscript, "-e", script.String())
		cmd.Stderr = &stderr
		out, err := cmd.Output()
		if err != nil {
			err = fmt.Errorf("%v: %s", err, stderr.String())
		}
		return out, err
	})
	if err != nil {
		t.Fatalf("needs: Rscript could not check its packages: %v", err)
	}
	if len(missing) > 0 {
		Missing(t, "R packages "+strings.Join(packages, ", "), strings.Join(missing, ", "))
	}
	return rscript
}

// probes remembers what each probe script found, so a test binary starts
// the interpreter once per set of modules.
var probes sync.Map // script → probeResult

type probeResult struct {
	missing []string
	err     error
}

// probe runs a script (once per test binary) that prints the Debian
// packages of what it cannot load, and returns them.
func probe(script string, run func() ([]byte, error)) ([]string, error) {
	if r, ok := probes.Load(script); ok {
		return r.(probeResult).missing, r.(probeResult).err
	}
	out, err := run()
	r := probeResult{strings.Fields(string(out)), err}
	probes.Store(script, r)
	return r.missing, r.err
}
