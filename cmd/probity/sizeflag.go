package main

import (
	"strconv"
	"strings"

	"probity/plan/inputerr"
	"probity/plan/inputfile"
	"probity/sampling"
)

// sizeUnits are the suffixes a size flag accepts, longest first: binary
// (KiB, MiB, GiB) and, as most people write them, K, M and G in the same
// binary sense.
var sizeUnits = []struct {
	suffix string
	shift  uint
}{{"kib", 10}, {"mib", 20}, {"gib", 30}, {"kb", 10}, {"mb", 20}, {"gb", 30}, {"k", 10}, {"m", 20}, {"g", 30}, {"b", 0}}

// parseSize reads a byte size flag such as 64MiB, 64M or 67108864.
func parseSize(flag, s string) (int64, error) {
	t := strings.ToLower(strings.TrimSpace(s))
	shift := uint(0)
	for _, u := range sizeUnits {
		if strings.HasSuffix(t, u.suffix) {
			t, shift = strings.TrimSpace(strings.TrimSuffix(t, u.suffix)), u.shift
			break
		}
	}
	v, err := strconv.ParseInt(t, 10, 64)
	if err != nil || v < 1 || v > (1<<40)>>shift {
		return 0, inputerr.Errorf("%s %q is not a size from 1 byte to 1 TiB", flag, s).WithHint("e.g. " + flag + " 64MiB")
	}
	return v << shift, nil
}

// maxLineHelp is the help of --max-line, shared by the commands that read
// a log.
var maxLineHelp = "the longest line the log may have, `SIZE` such as 64MiB (default " + strings.ReplaceAll(inputfile.Size(sampling.DefaultMaxLine), " ", "") + ")"
