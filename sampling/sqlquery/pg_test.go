package sqlquery

import (
	"bytes"
	"crypto/rand"
	"encoding/hex"
	"fmt"
	"io"
	"os/exec"
	"strings"
	"sync"
	"testing"

	"probity/plan/testkit/pgtest"
)

// pgServer is a PostgreSQL server reached through psql on a Unix socket:
// the throw-away cluster of probity/plan/testkit/pgtest, or the server
// PROBITY_TEST_PGHOST names.
type pgServer struct {
	psql string
	host string
	user string
	db   string
}

// needPostgres returns the test server, or skips the test when PostgreSQL
// is not installed — failing instead when CI is set, so CI cannot pass
// without it.
func needPostgres(t testing.TB) *pgServer {
	t.Helper()
	pg := pgtest.Need(t)
	srv := &pgServer{psql: pg.Psql, host: pg.Host, user: pg.User, db: "postgres"}
	testDBOnce.Do(func() { testDBErr = srv.createTestDB() })
	if testDBErr != nil {
		t.Fatal(testDBErr)
	}
	srv.db = testDBName
	return srv
}

// testDBName is the database the tests run in. It is created with a
// locale-aware ICU collation as its default, so that a query which forgot to
// order labels and keys by their bytes would fail the tests.
const testDBName = "probity_sqlquery_test"

var (
	testDBOnce sync.Once
	testDBErr  error
)

// createTestDB creates the test database (ICU "en-US" collation) unless
// it exists.
func (s *pgServer) createTestDB() error {
	out, err := s.run("SELECT count(*) FROM pg_database WHERE datname = '"+testDBName+"'", nil, "-A", "-t")
	if err != nil {
		return err
	}
	if strings.TrimSpace(string(out)) == "1" {
		return nil
	}
	_, err = s.run("CREATE DATABASE "+testDBName+" TEMPLATE template0 ENCODING 'UTF8' LOCALE_PROVIDER icu ICU_LOCALE 'en-US' LOCALE 'C.UTF-8'", nil)
	return err
}

// run executes an SQL script through psql with ON_ERROR_STOP and returns
// what psql wrote to stdout. Without stdin the script is read from psql's
// standard input; with stdin the script is one statement given with -c
// (a COPY … FROM STDIN, which then reads stdin to its end). Extra psql
// arguments (e.g. --csv) come before the script.
func (s *pgServer) run(script string, stdin io.Reader, args ...string) ([]byte, error) {
	argv := append([]string{"-h", s.host, "-U", s.user, "-X", "-q", "-v", "ON_ERROR_STOP=1", "-d", s.db}, args...)
	in := stdin
	if stdin == nil {
		argv = append(argv, "-f", "-")
		in = strings.NewReader(script + "\n")
	} else {
		argv = append(argv, "-c", script)
	}
	cmd := exec.Command(s.psql, argv...)
	cmd.Stdin = in
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
