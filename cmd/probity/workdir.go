package main

import (
	"path/filepath"
	"strings"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"
)

// A command whose deps.dir is set takes the relative paths on its command
// line from that folder, as a process takes them from its working
// directory; deps.dir empty means the process's own. The demo runs its
// steps this way inside its folder, so no command changes the process's
// working directory (and tests may run commands side by side).

// pathFlags are the flags of each command whose value is a path.
var pathFlags = map[string][]string{
	"plan":     {"out"},
	"keygen":   {"out", "passphrase-file"},
	"draw":     {"plan", "log", "out", "check", "anticipated", "selected", "counts"},
	"progress": {"plan", "draw", "labels"},
	"record":   {"plan", "draw", "labels", "out", "signoff", "sign-key", "passphrase-file", "templates", "second", "adjudicated", "trail"},
	"sign":     {"key", "passphrase-file", "signers", "templates"},
	"verify":   {"pub", "signers", "plan", "draw", "labels", "log", "second", "adjudicated", "templates", "trail"},
	"label":    {"plan", "media"},
	"trend":    {"chart", "pub", "signers"},
	"demo":     {"out"},
}

// pathArgs are the commands whose arguments are paths.
var pathArgs = map[string]bool{"verify": true, "trend": true, "sign": true, "label": true}

// takePathsFrom makes cmd's relative path flags and path arguments paths
// under dir (nothing when dir is ""). It runs before the command's own
// checks; args is the slice cobra then hands to the command, so it is
// changed in place.
func takePathsFrom(dir string, cmd *cobra.Command, args []string) error {
	if dir == "" {
		return nil
	}
	for _, name := range pathFlags[cmd.Name()] {
		f := cmd.Flags().Lookup(name)
		if list, ok := f.Value.(pflag.SliceValue); ok { // a repeatable flag
			paths := list.GetSlice()
			for i, p := range paths {
				paths[i] = inFolder(dir, p)
			}
			if err := list.Replace(paths); err != nil {
				return err
			}
			continue
		}
		if v := f.Value.String(); v != "" {
			if err := f.Value.Set(inFolder(dir, v)); err != nil {
				return err
			}
		}
	}
	if pathArgs[cmd.Name()] {
		for i, a := range args {
			args[i] = inFolder(dir, a)
		}
	}
	return nil
}

// inFolder is p taken from dir: p itself when it is absolute or "-"
// (stdin).
func inFolder(dir, p string) string {
	if p == "-" || filepath.IsAbs(p) {
		return p
	}
	return filepath.Join(dir, p)
}

// given is a path as it was typed on the command line: relative to d.dir
// when the command runs in a folder of its own (takePathsFrom made it
// absolute), p itself otherwise. Paths an artifact records go through it,
// so the artifact does not depend on where the folder is.
func (d deps) given(p string) string {
	if d.dir == "" {
		return p
	}
	rel, err := filepath.Rel(d.dir, p)
	if err != nil || rel == ".." || strings.HasPrefix(rel, ".."+string(filepath.Separator)) {
		return p
	}
	return rel
}
