package main

import (
	"regexp"
	"strings"
	"testing"
)

// TestHelpReads (issue 16, item 18): every command's help names each
// flag's value (no bare "string" or "int"), shows no stray backtick, fits
// 100 columns, and lists only the exit codes the command can return.
func TestHelpReads(t *testing.T) {
	t.Parallel()
	bareType := regexp.MustCompile(`--[a-z-]+ (string|int|float64|stringArray|strings|uint)\b`)
	returnsOne := map[string]bool{"draw": true, "record": true, "verify": true, "trend": true, "demo": true}
	for _, c := range []string{"plan", "draw", "record", "sign", "progress", "verify", "trend", "keygen", "demo"} {
		code, help, stderr := runProbity(t, c, "--help")
		if code != exitOK || stderr != "" {
			t.Fatalf("%s --help: exit %d %s", c, code, stderr)
		}
		for i, line := range strings.Split(help, "\n") {
			if n := len([]rune(line)); n > consoleWidth {
				t.Errorf("%s --help line %d is %d columns: %s", c, i+1, n, line)
			}
			if m := bareType.FindString(line); m != "" {
				t.Errorf("%s --help: %q names no value", c, m)
			}
			if strings.Contains(line, "`") {
				t.Errorf("%s --help line %d has a backtick: %s", c, i+1, line)
			}
		}
		section := help[strings.Index(help, "Exit codes:"):]
		section = section[:strings.Index(section, "\n\n")]
		if got := strings.Contains(section, "\n  1  "); got != returnsOne[c] {
			t.Errorf("%s --help lists exit code 1: %v, but the command returns it: %v\n%s", c, got, returnsOne[c], section)
		}
		for _, want := range []string{"\n  0  ", "\n  2  ", "\n  3  ", "\n  130, 143  "} {
			if !strings.Contains(section, want) {
				t.Errorf("%s --help lacks exit code %q", c, strings.TrimSpace(want))
			}
		}
	}
}
