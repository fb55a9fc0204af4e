// Command probity plans, draws and judges labeling audits of a deployed
// classifier's error rate, and issues the signed acceptance record.
package main

import (
	"fmt"
	"io"
	"os"
	"os/signal"
	"syscall"

	"probity/sampling/safewrite"
)

func main() {
	exitOnSignal(os.Stderr)
	os.Exit(run(os.Args[1:], systemDeps()))
}

// exitOnSignal is the one place probity handles SIGINT and SIGTERM: the
// files being written are removed (safewrite.Abort removes the temporaries
// and the folders the command created) and the process exits with 130 or
// 143, as a shell reports a process ended by the signal.
func exitOnSignal(stderr io.Writer) {
	signals := make(chan os.Signal, 1)
	signal.Notify(signals, syscall.SIGINT, syscall.SIGTERM)
	go func() {
		s := <-signals
		safewrite.Abort()
		code, what := exitTerminated, "terminated"
		if s == syscall.SIGINT {
			code, what = exitInterrupted, "interrupted"
		}
		fmt.Fprintf(stderr, "probity: %s: stopped; nothing it was writing was left behind\n", what)
		os.Exit(code)
	}()
}
