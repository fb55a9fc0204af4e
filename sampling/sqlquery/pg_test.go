package sqlquery

import (
	"bytes"
	"crypto/rand"
	"encoding/hex"
	"fmt"
	"io"
	"os"
	"os/exec"
	"strings"
	"testing"
)

// pgServer is a PostgreSQL server reached through psql on a Unix socket
// (PROBITY_TEST_PGHOST, the socket directory, and PROBITY_TEST_PGUSER, set
// by .ci/run for a throw-away cluster).
type pgServer struct {
	psql string
	host string
	user string
}

// needPostgres returns the test server, or skips the test when none is
// configured — failing instead when CI is set, so CI cannot pass without it.
func needPostgres(t testing.TB) *pgServer {
	t.Helper()
	host := os.Getenv("PROBITY_TEST_PGHOST")
	user := os.Getenv("PROBITY_TEST_PGUSER")
	psql, err := exec.LookPath("psql")
	if host == "" || err != nil {
		msg := "PostgreSQL is not configured (PROBITY_TEST_PGHOST unset or psql missing)"
		if os.Getenv("CI") != "" {
			t.Fatal(msg)
		}
		t.Skip(msg)
	}
	if user == "" {
		user = "postgres"
	}
	return &pgServer{psql: psql, host: host, user: user}
}

// run executes SQL through psql with ON_ERROR_STOP, feeding stdin (for
// COPY … FROM STDIN) when given, and returns what psql wrote to stdout.
// Extra psql arguments (e.g. --csv) come before the script.
func (s *pgServer) run(sql string, stdin io.Reader, args ...string) ([]byte, error) {
	argv := append([]string{"-h", s.host, "-U", s.user, "-X", "-q", "-v", "ON_ERROR_STOP=1", "-d", "postgres"}, args...)
	var script string
	if stdin == nil {
		argv = append(argv, "-c", sql)
	} else {
		script = sql
		argv = append(argv, "-f", "-")
		stdin = io.MultiReader(strings.NewReader(script+"\n"), stdin, strings.NewReader("\\.\n"))
	}
	cmd := exec.Command(s.psql, argv...)
	cmd.Stdin = stdin
	var out, errb bytes.Buffer
	cmd.Stdout = &out
	cmd.Stderr = &errb
	if err := cmd.Run(); err != nil {
		return out.Bytes(), fmt.Errorf("psql: %v: %s", err, strings.TrimSpace(errb.String()))
	}
	return out.Bytes(), nil
}

// mustRun is run that fails the test on an error.
func (s *pgServer) mustRun(t testing.TB, sql string, args ...string) []byte {
	t.Helper()
	out, err := s.run(sql, nil, args...)
	if err != nil {
		t.Fatal(err)
	}
	return out
}

// schema creates a fresh schema for one test, with a name that needs
// quoting, and drops it when the test ends.
func (s *pgServer) schema(t testing.TB) string {
	t.Helper()
	var b [6]byte
	if _, err := rand.Read(b[:]); err != nil {
		t.Fatal(err)
	}
	name := "probity test " + hex.EncodeToString(b[:])
	q, err := Postgres.QuoteIdent(name)
	if err != nil {
		t.Fatal(err)
	}
	s.mustRun(t, "CREATE SCHEMA "+q)
	t.Cleanup(func() { _, _ = s.run("DROP SCHEMA "+q+" CASCADE", nil) })
	return name
}
