package main

import (
	"bytes"
	"io"
	"testing"
	"time"
)

// testClock is the fixed "now" of command tests: 1 December 2026, 12:00 UTC.
var testClock = time.Date(2026, 12, 1, 12, 0, 0, 0, time.UTC)

// testOption changes one thing in the deps newTestDeps builds.
type testOption func(*deps)

// newTestDeps returns deps for a command test and the buffers its stdout and
// stderr go to: an empty stdin, the clock fixed at testClock, a fixed random
// stream (256 bytes 0x5a), version "0.1.0-test", and no terminal. Each
// command line gets fresh deps (the random stream is read as it is used).
// Options change one of these.
func newTestDeps(opts ...testOption) (d deps, stdout, stderr *bytes.Buffer) {
	stdout, stderr = new(bytes.Buffer), new(bytes.Buffer)
	d = deps{
		stdin:   bytes.NewReader(nil),
		stdout:  stdout,
		stderr:  stderr,
		now:     func() time.Time { return testClock },
		random:  bytes.NewReader(bytes.Repeat([]byte{0x5a}, 256)),
		version: "0.1.0-test",
	}
	for _, o := range opts {
		o(&d)
	}
	return d, stdout, stderr
}

// runTest runs one command line with fresh test deps and returns the exit
// code, stdout and stderr.
func runTest(t testing.TB, args []string, opts ...testOption) (int, string, string) {
	t.Helper()
	d, stdout, stderr := newTestDeps(opts...)
	code := run(args, d)
	return code, stdout.String(), stderr.String()
}

// atTime fixes the clock at tm.
func atTime(tm time.Time) testOption {
	return func(d *deps) { d.now = func() time.Time { return tm } }
}

// withClock sets the clock function (a clock that advances, for progress
// bars).
func withClock(now func() time.Time) testOption { return func(d *deps) { d.now = now } }

// withRandom makes the random stream the bytes b (io.EOF after them).
func withRandom(b []byte) testOption {
	return func(d *deps) { d.random = bytes.NewReader(b) }
}

// withVersion sets the tool version written into artifacts.
func withVersion(v string) testOption { return func(d *deps) { d.version = v } }

// withStdin sets stdin.
func withStdin(r io.Reader) testOption { return func(d *deps) { d.stdin = r } }

// withEnv gives the command the environment variables env (and no other).
func withEnv(env map[string]string) testOption {
	return func(d *deps) { d.getenv = func(k string) string { return env[k] } }
}

// withDir runs the command inside dir (deps.dir: its relative paths are
// taken from there).
func withDir(dir string) testOption { return func(d *deps) { d.dir = dir } }

// onTerminal makes stderr a terminal (progress bars are drawn).
func onTerminal() testOption { return func(d *deps) { d.stderrIsTerminal = true } }

// withRandomFrom makes the random stream r (a generator, for a command that
// draws many tokens).
func withRandomFrom(r io.Reader) testOption { return func(d *deps) { d.random = r } }

// withOutput sends stdout and stderr to out and errOut instead of the
// buffers newTestDeps returns (streams a test reads while the command
// runs).
func withOutput(out, errOut io.Writer) testOption {
	return func(d *deps) { d.stdout, d.stderr = out, errOut }
}

// withWidth fits what the command prints for people into n columns, as on
// a terminal (deps.width).
func withWidth(n int) testOption { return func(d *deps) { d.width = n } }

// withStop ends a command that serves (label) when stop is closed.
func withStop(stop <-chan struct{}) testOption { return func(d *deps) { d.stop = stop } }
