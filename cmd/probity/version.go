package main

import (
	"runtime/debug"
	"strings"
)

// version is the release version of probity; a build from a checkout adds
// the VCS revision (see toolVersion).
const version = "0.1.0"

// toolVersion returns the version string written into artifacts: the
// release version, plus the VCS revision and a "+dirty" mark when the binary
// was built from a checkout with VCS stamping.
func toolVersion() string {
	info, ok := debug.ReadBuildInfo()
	if !ok {
		return version
	}
	var rev, modified string
	for _, s := range info.Settings {
		switch s.Key {
		case "vcs.revision":
			rev = s.Value
		case "vcs.modified":
			modified = s.Value
		}
	}
	if rev == "" {
		return version
	}
	if len(rev) > 12 {
		rev = rev[:12]
	}
	v := version + " (" + rev
	if modified == "true" {
		v += "+dirty"
	}
	return strings.TrimSpace(v + ")")
}
