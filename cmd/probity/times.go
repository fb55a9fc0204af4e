package main

import (
	"probity/plan/chrono"
	"probity/plan/inputerr"
)

// This file holds the one way a command stamps the time of its step (plan
// made, sample drawn, record issued): the injected clock, or the time the
// operator supplies with --date, which the artifact then records as
// supplied by the operator (chrono.SourceOperator). Outputs that must be
// byte for byte the same on every run (tests, the demo) supply it.

// dateFlagUsage is the help of --date on every command that takes it.
func dateFlagUsage(step string) string {
	return "record `TIME` as when " + step + ", marked as supplied by the operator, instead of the clock's time " +
		"(YYYY-MM-DD, YYYY-MM-DD HH:MM:SS in UTC, or RFC 3339)"
}

// parseDateFlag checks --date's value before any file is read.
func parseDateFlag(value string) error {
	if value == "" {
		return nil
	}
	if _, err := chrono.ParseSupplied(value); err != nil {
		return inputerr.Errorf("--date %v", err).WithHint("for example --date 2026-12-01T09:30:00Z, or leave it out to use the clock")
	}
	return nil
}

// stepTime is the stamp of this command's step: the clock's time read
// once, or --date's (already checked by parseDateFlag).
func stepTime(d deps, supplied string) chrono.Stamp {
	if supplied == "" {
		return chrono.FromClock(d.now())
	}
	t, _ := chrono.ParseSupplied(supplied)
	return chrono.Supplied(t)
}
