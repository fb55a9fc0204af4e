package main

import "strconv"

// count writes n with the noun in the number it takes: "1 stratum",
// "3 strata", "0 errors".
func count(n int64, one, many string) string {
	if n == 1 {
		return "1 " + one
	}
	return strconv.FormatInt(n, 10) + " " + many
}

// countOf is count for an int.
func countOf(n int, one, many string) string { return count(int64(n), one, many) }
