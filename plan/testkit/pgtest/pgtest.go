// Package pgtest gives tests a PostgreSQL server reached through psql on a
// Unix socket.
//
// When PROBITY_TEST_PGHOST names the socket folder of a running server
// (with PROBITY_TEST_PGUSER, default postgres), the tests use it. Otherwise,
// where Debian's PostgreSQL server programs are installed
// (/usr/lib/postgresql/VERSION/bin/initdb), the first test that asks starts
// a throw-away cluster: initdb into a temporary folder, then pg_ctl start
// with the socket in that folder and no TCP listener (as the postgres user,
// through runuser, when the tests run as root). Main stops it and removes
// the folder when the test binary ends. With neither, the tests skip, and
// fail under CI (see probity/plan/testkit/needs).
//
// It serves tests only (testkit): probity itself never imports it.
package pgtest

import (
	"bytes"
	"fmt"
	"os"
	"os/exec"
	"os/user"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
	"sync"
	"testing"

	"probity/plan/testkit/needs"
)

// Server is a PostgreSQL server the tests reach with psql.
type Server struct {
	// Psql is the path of the psql client.
	Psql string
	// Host is the folder of the server's Unix socket.
	Host string
	// User is the role the tests connect as (a superuser).
	User string
}

// Args are psql's connection arguments for database db.
func (s *Server) Args(db string) []string {
	return []string{"-h", s.Host, "-U", s.User, "-d", db}
}

var (
	once    sync.Once
	server  *Server
	missing string // what is missing when no server can be had
	pkg     string // its Debian package
	failure error  // a cluster that could not start
	cluster *throwaway
)

// Need returns the server for a test, starting the throw-away cluster on
// first use. Without one the test skips (fails under CI); a cluster that
// fails to start fails the test.
func Need(t testing.TB) *Server {
	t.Helper()
	once.Do(start)
	switch {
	case failure != nil:
		t.Fatalf("pgtest: %v", failure)
	case server == nil:
		needs.Missing(t, missing, pkg)
	}
	return server
}

// Main runs the tests of m and then stops the throw-away cluster, if one
// was started, and exits with the tests' code. A package whose tests call
// Need runs it from its TestMain.
func Main(m *testing.M) {
	code := m.Run()
	if cluster != nil {
		if err := cluster.stop(); err != nil {
			fmt.Fprintf(os.Stderr, "pgtest: %v\n", err)
			if code == 0 {
				code = 1
			}
		}
	}
	os.Exit(code)
}

// start finds or starts the server (once per test binary).
func start() {
	psql, err := exec.LookPath("psql")
	if err != nil {
		missing, pkg = "psql", "postgresql-client"
		return
	}
	if host := os.Getenv("PROBITY_TEST_PGHOST"); host != "" {
		u := os.Getenv("PROBITY_TEST_PGUSER")
		if u == "" {
			u = "postgres"
		}
		server = &Server{Psql: psql, Host: host, User: u}
		return
	}
	bin := serverBin()
	if bin == "" {
		missing, pkg = "the PostgreSQL server programs (/usr/lib/postgresql/*/bin/initdb)", "postgresql"
		return
	}
	cluster, failure = startCluster(bin)
	if failure == nil {
		server = &Server{Psql: psql, Host: cluster.dir, User: "postgres"}
	}
}

// serverBin is the bin folder of the newest installed PostgreSQL server, or
// "".
func serverBin() string {
	found, _ := filepath.Glob("/usr/lib/postgresql/*/bin/initdb")
	sort.Slice(found, func(i, j int) bool { return majorOf(found[i]) < majorOf(found[j]) })
	if len(found) == 0 {
		return ""
	}
	return filepath.Dir(found[len(found)-1])
}

// majorOf is the version number in /usr/lib/postgresql/VERSION/bin/initdb.
func majorOf(initdb string) float64 {
	v, _ := strconv.ParseFloat(filepath.Base(filepath.Dir(filepath.Dir(initdb))), 64)
	return v
}

// throwaway is a cluster this test binary started.
type throwaway struct {
	bin string // the server's bin folder
	dir string // the temporary folder: data/, the socket, the log
	// asPostgres runs the server programs as the postgres user (the tests
	// run as root, which PostgreSQL refuses).
	asPostgres bool
}

// startCluster runs initdb into a new temporary folder and starts the
// server with its socket there and no TCP listener; trust authentication,
// and no fsync (the data is thrown away).
func startCluster(bin string) (*throwaway, error) {
	c := &throwaway{bin: bin, asPostgres: os.Geteuid() == 0}
	dir, err := os.MkdirTemp("", "probity-pg-")
	if err != nil {
		return nil, err
	}
	c.dir = dir
	if c.asPostgres {
		u, err := user.Lookup("postgres")
		if err != nil {
			os.RemoveAll(dir)
			return nil, fmt.Errorf("running as root, the cluster needs the postgres user: %v", err)
		}
		uid, _ := strconv.Atoi(u.Uid)
		gid, _ := strconv.Atoi(u.Gid)
		if err := os.Chown(dir, uid, gid); err != nil {
			os.RemoveAll(dir)
			return nil, err
		}
	}
	data := filepath.Join(dir, "data")
	if err := c.run("initdb", "-D", data, "-A", "trust", "-U", "postgres", "-E", "UTF8", "--locale", "C.UTF-8"); err != nil {
		os.RemoveAll(dir)
		return nil, err
	}
	opts := "-k " + dir + " -c listen_addresses='' -c fsync=off -c full_page_writes=off -c max_wal_size=4GB"
	if err := c.run("pg_ctl", "-D", data, "-l", filepath.Join(dir, "log"), "-w", "-o", opts, "start"); err != nil {
		log, _ := os.ReadFile(filepath.Join(dir, "log"))
		os.RemoveAll(dir)
		return nil, fmt.Errorf("%v\n%s", err, log)
	}
	return c, nil
}

// stop stops the server and removes its folder.
func (c *throwaway) stop() error {
	err := c.run("pg_ctl", "-D", filepath.Join(c.dir, "data"), "-m", "fast", "-w", "stop")
	if rmErr := os.RemoveAll(c.dir); err == nil {
		err = rmErr
	}
	return err
}

// run runs one of the server's programs (as the postgres user when the
// tests run as root) and returns its output in the error when it fails.
func (c *throwaway) run(program string, args ...string) error {
	path := filepath.Join(c.bin, program)
	cmd := exec.Command(path, args...)
	if c.asPostgres {
		cmd = exec.Command("runuser", append([]string{"-u", "postgres", "--", path}, args...)...)
	}
	cmd.Dir = c.dir // readable by postgres, unlike the caller's folder may be
	var out bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &out
	if err := cmd.Run(); err != nil {
		return fmt.Errorf("%s: %v\n%s", strings.Join(cmd.Args, " "), err, out.String())
	}
	return nil
}
