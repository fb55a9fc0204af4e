package main

import (
	"fmt"
	"strings"
)

// Exit codes of every probity command. They are documented in the root
// command's help and in the README; pipelines that gate a deployment rely on
// them, so they never change meaning.
const (
	// exitOK: success; for record, verify and trend: every required
	// candidate accepted and every check passed.
	exitOK = 0
	// exitRejected: a candidate was rejected, a check found a difference,
	// or a verification failed.
	exitRejected = 1
	// exitBadInput: bad input or usage; nothing was written.
	exitBadInput = 2
	// exitInternal: an internal error (a recovered panic); please report it.
	exitInternal = 3
	// exitInterrupted and exitTerminated: stopped by SIGINT (Ctrl-C) or
	// SIGTERM (128 + the signal's number); what was being written was
	// removed.
	exitInterrupted = 130
	exitTerminated  = 143
)

// exitCodesHelp is appended to the root command's long help: every code
// any command returns. Each command's help lists only its own (exitHelp).
const exitCodesHelp = `Exit codes:
  0  success: the plan was made, the sample drawn, every required candidate
     accepted, every check passed
  1  rejected: a candidate was rejected, or a check or verification failed
  2  bad input or usage: nothing was written
  3  internal error: please report it with the command line you ran
  130, 143  stopped by Ctrl-C (SIGINT) or SIGTERM: nothing half-written is left`

// exitHelp is the "Exit codes:" section of one command's help, listing
// only the codes it can return: ok and rejected say what 0 and 1 mean for
// it (rejected is empty when it never returns 1), writes whether it writes
// files (so that a stop leaves nothing half-written).
func exitHelp(ok, rejected string, writes bool) string {
	var b strings.Builder
	b.WriteString("Exit codes:\n")
	fmt.Fprintf(&b, "  0  %s\n", hang(ok))
	if rejected != "" {
		fmt.Fprintf(&b, "  1  %s\n", hang(rejected))
	}
	if writes {
		b.WriteString("  2  bad input or usage: nothing was written\n")
	} else {
		b.WriteString("  2  bad input or usage\n")
	}
	b.WriteString("  3  internal error: please report it with the command line you ran\n")
	b.WriteString("  130, 143  stopped by Ctrl-C (SIGINT) or SIGTERM")
	if writes {
		b.WriteString(": nothing half-written is left")
	}
	return b.String()
}

// hang indents the continuation lines of an exit code's text under its
// first line.
func hang(text string) string { return strings.ReplaceAll(text, "\n", "\n     ") }
