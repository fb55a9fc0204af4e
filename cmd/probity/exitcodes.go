package main

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

// exitCodesHelp is appended to the root command's long help.
const exitCodesHelp = `Exit codes:
  0  success: the plan was made, the sample drawn, every required candidate
     accepted, every check passed
  1  rejected: a candidate was rejected, or a check or verification failed
  2  bad input or usage: nothing was written
  3  internal error: please report it with the command line you ran
  130, 143  stopped by Ctrl-C (SIGINT) or SIGTERM: nothing half-written is left`
