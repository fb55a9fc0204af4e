package main

import (
	"fmt"
	"probity/plan/inputerr"
	"runtime/debug"
	"strings"

	"github.com/spf13/cobra"
)

// run builds a fresh command tree, executes it with args and returns the
// process exit code. It is the only entry point main calls; tests call it
// directly with their own deps.
func run(args []string, d deps) (code int) {
	defer func() {
		if r := recover(); r != nil {
			fmt.Fprintf(d.stderr, "probity: internal error: %v\n%s\n%s", r, internalPlea, debug.Stack())
			code = exitInternal
		}
	}()
	var fit *fitWriter
	if d.width > 0 {
		fit = &fitWriter{w: d.stdout, width: d.width}
		d.stdout = fit
		defer fit.Flush()
	}
	root := newRootCommand(d)
	if fit != nil {
		// cobra runs a command's nearest PersistentPreRunE and skips a
		// PersistentPreRun beside it, so the machine-output switch goes
		// inside the root's hook.
		pre := root.PersistentPreRunE
		root.PersistentPreRunE = func(c *cobra.Command, args []string) error {
			fit.raw = machineOutput(c)
			return pre(c, args)
		}
	}
	// An unknown command is cobra's to find and the user's to fix.
	if _, _, err := root.Find(args); err != nil {
		return reportError(d.stderr, inputerr.Errorf("%w", err).WithHint("see 'probity --help' for the commands"))
	}
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
		PersistentPreRunE: func(cmd *cobra.Command, args []string) error {
			return takePathsFrom(d.dir, cmd, args)
		},
	}
	root.SetOut(d.stdout)
	root.SetErr(d.stderr)
	root.SetIn(d.stdin)
	root.SetVersionTemplate("probity {{.Version}}\n")
	root.SetUsageTemplate(wrappedUsage(root.UsageTemplate()))
	root.SetFlagErrorFunc(func(c *cobra.Command, err error) error {
		return inputerr.Errorf("%w", err).WithHint("see '" + c.CommandPath() + " --help'")
	})
	root.CompletionOptions.DisableDefaultCmd = true
	for _, c := range commands(d) {
		usageArgs(c)
		root.AddCommand(c)
	}
	return root
}

// usageArgs makes the errors of c's argument check (cobra's own, such as
// cobra.NoArgs) input errors with a pointer to c's help.
func usageArgs(c *cobra.Command) {
	check := c.Args
	if check == nil {
		return
	}
	c.Args = func(cmd *cobra.Command, args []string) error {
		err := check(cmd, args)
		if err == nil || inputerr.Is(err) {
			return err
		}
		return inputerr.Errorf("%w", err).WithHint("see '" + cmd.CommandPath() + " --help'")
	}
}

// consoleWidth is the widest line of the commands' console output, help
// included.
const consoleWidth = 100

// wrappedUsage is cobra's usage template with the flag descriptions
// wrapped to consoleWidth columns.
func wrappedUsage(tpl string) string {
	return strings.NewReplacer(
		"{{.LocalFlags.FlagUsages", fmt.Sprintf("{{.LocalFlags.FlagUsagesWrapped %d", consoleWidth),
		"{{.InheritedFlags.FlagUsages", fmt.Sprintf("{{.InheritedFlags.FlagUsagesWrapped %d", consoleWidth),
	).Replace(tpl)
}
