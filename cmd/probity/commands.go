package main

import "github.com/spf13/cobra"

// commands lists the subcommands in the order --help shows them. Each
// constructor builds a fresh command with its own options struct.
func commands(d deps) []*cobra.Command {
	return []*cobra.Command{
		newPlanCommand(d),
		newDrawCommand(d),
		newLabelCommand(d),
		newRecordCommand(d),
		newSignCommand(d),
		newVerifyCommand(d),
		newKeygenCommand(d),
		newTrendCommand(d),
		newProgressCommand(d),
		newDemoCommand(d),
	}
}
