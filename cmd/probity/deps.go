package main

import (
	"crypto/rand"
	"fmt"
	"io"
	"os"
	"time"

	"golang.org/x/term"
)

// deps holds everything a command takes from its environment, so tests can
// run a fresh command tree with their own streams, clock and randomness.
type deps struct {
	stdin  io.Reader
	stdout io.Writer
	stderr io.Writer
	// now is the clock; commands that stamp a date read it once.
	now func() time.Time
	// random is the source of seeds and keys (crypto/rand in production).
	random io.Reader
	// stderrIsTerminal enables progress bars.
	stderrIsTerminal bool
	// stdoutIsTerminal selects human-oriented output.
	stdoutIsTerminal bool
	// version is the tool version written into every artifact.
	version string
	// dir is the folder relative paths on the command line are taken from
	// (see takePathsFrom); empty for the process's working directory.
	dir string
	// width, when above 0, is the number of columns people's output is
	// fitted into (lines broken at spaces; see fitWriter).
	width int
	// stop ends a command that serves until stopped (label); nil in a
	// real process, which a signal ends (exitOnSignal).
	stop <-chan struct{}
	// getenv reads an environment variable (nil: none is set).
	getenv func(string) string
	// readPassword asks for a secret on the terminal without echoing it,
	// after printing prompt to stderr; nil when there is no terminal.
	readPassword func(prompt string) ([]byte, error)
}

// env returns the environment variable name, or "" when deps has none.
func (d deps) env(name string) string {
	if d.getenv == nil {
		return ""
	}
	return d.getenv(name)
}

// systemDeps returns the dependencies of a real process.
func systemDeps() deps {
	return deps{
		stdin:            os.Stdin,
		stdout:           os.Stdout,
		stderr:           os.Stderr,
		now:              time.Now,
		random:           rand.Reader,
		stderrIsTerminal: term.IsTerminal(int(os.Stderr.Fd())),
		stdoutIsTerminal: term.IsTerminal(int(os.Stdout.Fd())),
		version:          toolVersion(),
		width:            consoleWidth,
		getenv:           os.Getenv,
		readPassword:     terminalPassword(),
	}
}

// terminalPassword reads a secret from the controlling terminal (stdin
// when it is one), or is nil when there is none.
func terminalPassword() func(string) ([]byte, error) {
	fd := int(os.Stdin.Fd())
	if !term.IsTerminal(fd) {
		return nil
	}
	return func(prompt string) ([]byte, error) {
		fmt.Fprint(os.Stderr, prompt)
		defer fmt.Fprintln(os.Stderr)
		return term.ReadPassword(fd)
	}
}
