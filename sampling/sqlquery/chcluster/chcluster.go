// Package chcluster starts throw-away ClickHouse clusters for tests: two
// servers on loopback ports, each one shard of the cluster Name, configured
// in a temporary folder (no systemd, no service account) and killed when
// the test ends. It runs Debian's clickhouse-server and clickhouse-client
// (18.16 or later). Start fails the test when they are missing and the CI
// environment variable is set, and skips it otherwise.
package chcluster

import (
	"bytes"
	"encoding/xml"
	"errors"
	"fmt"
	"io"
	"net"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"

	"probity/plan/testkit/needs"
)

// Name is the cluster's name in the servers' remote_servers section, as a
// Distributed table names it.
const Name = "probity"

// Cluster is two running servers, each a shard of Name.
type Cluster struct {
	Shards []*Server
	client string
}

// Server is one running clickhouse-server.
type Server struct {
	// Port is its native TCP port on 127.0.0.1.
	Port   int
	dir    string
	client string
	cmd    *exec.Cmd
	exited chan struct{}
}

// Binaries returns the paths of clickhouse-server and clickhouse-client,
// failing the test under CI and skipping it otherwise when one is missing
// (probity/plan/testkit/needs).
func Binaries(t testing.TB) (server, client string) {
	t.Helper()
	return needs.Program(t, "clickhouse-server"), needs.Program(t, "clickhouse-client")
}

// Start starts two servers in a temporary folder and waits until both
// answer. They are killed when the test ends.
func Start(t testing.TB) *Cluster {
	t.Helper()
	server, client := Binaries(t)
	dir := t.TempDir()
	ports := freePorts(t, 2)
	users := filepath.Join(dir, "users.xml")
	if err := os.WriteFile(users, []byte(usersXML), 0o644); err != nil {
		t.Fatal(err)
	}
	c := &Cluster{client: client}
	for i, port := range ports {
		sdir := filepath.Join(dir, fmt.Sprintf("shard%d", i+1))
		if err := os.MkdirAll(sdir, 0o755); err != nil {
			t.Fatal(err)
		}
		conf := filepath.Join(sdir, "config.xml")
		if err := os.WriteFile(conf, []byte(configXML(sdir, users, port, ports)), 0o644); err != nil {
			t.Fatal(err)
		}
		s := &Server{Port: port, dir: sdir, client: client, exited: make(chan struct{})}
		s.cmd = exec.Command(server, "--config-file="+conf)
		s.cmd.Dir = sdir
		out, err := os.Create(filepath.Join(sdir, "stdout.log"))
		if err != nil {
			t.Fatal(err)
		}
		s.cmd.Stdout, s.cmd.Stderr = out, out
		if err := s.cmd.Start(); err != nil {
			t.Fatal(err)
		}
		go func() { _ = s.cmd.Wait(); out.Close(); close(s.exited) }()
		t.Cleanup(func() { _ = s.Kill() })
		c.Shards = append(c.Shards, s)
	}
	for _, s := range c.Shards {
		if err := s.waitReady(30 * time.Second); err != nil {
			t.Fatal(err)
		}
	}
	return c
}

// waitReady polls the server until it answers a query.
func (s *Server) waitReady(limit time.Duration) error {
	deadline := time.Now().Add(limit)
	for {
		_, err := s.Query("SELECT 1", nil)
		if err == nil {
			return nil
		}
		select {
		case <-s.exited:
			return fmt.Errorf("clickhouse-server on port %d exited at start-up:\n%s", s.Port, s.ErrorLog())
		default:
		}
		if time.Now().After(deadline) {
			return fmt.Errorf("clickhouse-server on port %d did not answer within %v: %v\n%s", s.Port, limit, err, s.ErrorLog())
		}
		time.Sleep(100 * time.Millisecond)
	}
}

// ErrorLog returns the end of the server's error log.
func (s *Server) ErrorLog() string {
	data, _ := os.ReadFile(filepath.Join(s.dir, "server.err.log"))
	if len(data) > 4000 {
		data = data[len(data)-4000:]
	}
	return string(data)
}

// Kill stops the server at once (SIGKILL) and waits for it to exit.
func (s *Server) Kill() error {
	select {
	case <-s.exited:
		return nil
	default:
	}
	if err := s.cmd.Process.Signal(syscall.SIGKILL); err != nil && !errors.Is(err, os.ErrProcessDone) {
		return err
	}
	<-s.exited
	return nil
}

// Running reports whether the server process is still running.
func (s *Server) Running() bool {
	select {
	case <-s.exited:
		return false
	default:
		return true
	}
}

// Query runs sql with clickhouse-client on this server and returns its
// standard output. Without stdin the query text is the client's standard
// input; with stdin (the data of an INSERT … FORMAT) it is given with
// --query. Extra client arguments (settings such as
// --insert_distributed_sync=1) come first. The error holds the client's
// standard error.
func (s *Server) Query(sql string, stdin io.Reader, args ...string) ([]byte, error) {
	argv := append([]string{"--host", "127.0.0.1", "--port", fmt.Sprint(s.Port)}, args...)
	in := stdin
	if stdin == nil {
		in = strings.NewReader(sql)
	} else {
		argv = append(argv, "--query", sql)
	}
	cmd := exec.Command(s.client, argv...)
	cmd.Stdin = in
	var out, errb bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &errb
	if err := cmd.Run(); err != nil {
		return out.Bytes(), fmt.Errorf("clickhouse-client: %v: %s", err, strings.TrimSpace(errb.String()))
	}
	return out.Bytes(), nil
}

// Command returns the clickhouse-client command that runs a query read
// from its standard input on this server, for a caller that starts it and
// stops a shard while it runs.
func (s *Server) Command(args ...string) *exec.Cmd {
	return exec.Command(s.client, append([]string{"--host", "127.0.0.1", "--port", fmt.Sprint(s.Port)}, args...)...)
}

// Query runs sql on the first shard (see Server.Query).
func (c *Cluster) Query(sql string, stdin io.Reader, args ...string) ([]byte, error) {
	return c.Shards[0].Query(sql, stdin, args...)
}

// MustQuery is Query that fails the test on an error.
func (c *Cluster) MustQuery(t testing.TB, sql string, stdin io.Reader, args ...string) []byte {
	t.Helper()
	out, err := c.Query(sql, stdin, args...)
	if err != nil {
		t.Fatal(err)
	}
	return out
}

// CreateDistributed creates the MergeTree table local (columns in
// ClickHouse's syntax, e.g. "id String, score Float64") on every shard and
// the Distributed table dist over them, rows spread at random. Both names
// are quoted identifiers, e.g. `default."pred log"`.
func (c *Cluster) CreateDistributed(t testing.TB, dist, local, database, localName, columns string) {
	t.Helper()
	for _, s := range c.Shards {
		if _, err := s.Query("CREATE TABLE "+local+" ("+columns+") ENGINE = MergeTree ORDER BY tuple()", nil); err != nil {
			t.Fatal(err)
		}
	}
	c.MustQuery(t, "CREATE TABLE "+dist+" AS "+local+" ENGINE = Distributed("+Name+", "+database+", "+localName+", rand())", nil)
}

// freePorts returns n TCP ports free on 127.0.0.1 a moment ago.
func freePorts(t testing.TB, n int) []int {
	t.Helper()
	var ports []int
	var ls []net.Listener
	for range n {
		l, err := net.Listen("tcp", "127.0.0.1:0")
		if err != nil {
			t.Fatal(err)
		}
		ls = append(ls, l)
		ports = append(ports, l.Addr().(*net.TCPAddr).Port)
	}
	for _, l := range ls {
		l.Close()
	}
	return ports
}

// xmlText escapes s for an XML text node.
func xmlText(s string) string {
	var b strings.Builder
	_ = xml.EscapeText(&b, []byte(s))
	return b.String()
}

// configXML is one server's configuration: its folder, its port, and the
// cluster of all shards.
func configXML(dir, users string, port int, shards []int) string {
	var remote strings.Builder
	for _, p := range shards {
		fmt.Fprintf(&remote, "      <shard><replica><host>127.0.0.1</host><port>%d</port></replica></shard>\n", p)
	}
	d := xmlText(dir)
	return `<?xml version="1.0"?>
<yandex>
  <logger>
    <level>warning</level>
    <log>` + d + `/server.log</log>
    <errorlog>` + d + `/server.err.log</errorlog>
  </logger>
  <listen_host>127.0.0.1</listen_host>
  <tcp_port>` + fmt.Sprint(port) + `</tcp_port>
  <path>` + d + `/data/</path>
  <tmp_path>` + d + `/tmp/</tmp_path>
  <user_files_path>` + d + `/user_files/</user_files_path>
  <users_config>` + xmlText(users) + `</users_config>
  <default_profile>default</default_profile>
  <default_database>default</default_database>
  <mark_cache_size>67108864</mark_cache_size>
  <uncompressed_cache_size>67108864</uncompressed_cache_size>
  <remote_servers>
    <` + Name + `>
` + remote.String() + `    </` + Name + `>
  </remote_servers>
</yandex>
`
}

// usersXML has the one user, default, without a password, reachable from
// the loopback address only.
const usersXML = `<?xml version="1.0"?>
<yandex>
  <profiles><default></default></profiles>
  <users>
    <default>
      <password></password>
      <networks><ip>127.0.0.1</ip></networks>
      <profile>default</profile>
      <quota>default</quota>
    </default>
  </users>
  <quotas><default></default></quotas>
</yandex>
`
