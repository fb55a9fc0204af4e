package main

import (
	"errors"
	"fmt"
	"io"
	"runtime/debug"

	"github.com/spf13/cobra"
)

// run builds a fresh command tree, executes it with args and returns the
// process exit code. It is the only entry point main calls; tests call it
// directly with their own deps.
func run(args []string, d deps) (code int) {
	defer func() {
		if r := recover(); r != nil {
			fmt.Fprintf(d.stderr, "probity: internal error: %v\n", r)
			fmt.Fprintf(d.stderr, "hint: this is a bug in probity, not in your input; please report it with the command line you ran\n%s", debug.Stack())
			code = exitInternal
		}
	}()
	root := newRootCommand(d)
	root.SetArgs(args)
	err := root.Execute()
	return reportError(d.stderr, err)
}

// newRootCommand builds the probity command tree.
func newRootCommand(d deps) *cobra.Command {
	root := &cobra.Command{
		Use:   "probity",
		Short: "Plan, draw and judge labeling audits of a classifier's error rate",
		Long: `probity sizes a labeling audit that shows, at a stated confidence, that a
classifier's error stays under a ceiling; draws a stratified, reproducible
sample from the prediction log; and, once the labels are back, issues the
signed acceptance record.

` + exitCodesHelp,
		Version:       d.version,
		SilenceErrors: true,
		SilenceUsage:  true,
	}
	root.SetOut(d.stdout)
	root.SetErr(d.stderr)
	root.SetIn(d.stdin)
	root.SetVersionTemplate("probity {{.Version}}\n")
	root.SetFlagErrorFunc(func(c *cobra.Command, err error) error {
		return &userError{msg: err.Error(), hint: "see '" + c.CommandPath() + " --help'", err: err}
	})
	root.CompletionOptions.DisableDefaultCmd = true
	root.AddCommand(commands(d)...)
	return root
}

// reportError prints err in probity's one-line shape and maps it to an exit
// code: outcome errors (rejections, failed checks) to 1, internal errors to
// 3, everything else — bad flags, bad files — to 2.
func reportError(stderr io.Writer, err error) int {
	if err == nil {
		return exitOK
	}
	var oe *outcomeError
	if errors.As(err, &oe) {
		if oe.msg != "" {
			fmt.Fprintf(stderr, "probity: %s\n", oe.msg)
		}
		return exitRejected
	}
	var ie *internalError
	if errors.As(err, &ie) {
		fmt.Fprintf(stderr, "probity: internal error: %s\n", ie.msg)
		fmt.Fprintln(stderr, "hint: this is a bug in probity, not in your input; please report it with the command line you ran")
		return exitInternal
	}
	fmt.Fprintf(stderr, "probity: %s\n", err.Error())
	var ue *userError
	if errors.As(err, &ue) && ue.hint != "" {
		fmt.Fprintf(stderr, "hint: %s\n", ue.hint)
	}
	return exitBadInput
}

// internalError is a broken invariant inside probity: exit code 3.
type internalError struct{ msg string }

func (e *internalError) Error() string { return e.msg }
