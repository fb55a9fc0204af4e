// Command probity-genlog writes a synthetic prediction log (invented
// records) for trying probity draw and for its benchmarks:
//
//	probity-genlog -rows 10000000 -o /tmp/log.csv
//
// Columns: record_id, region, channel (12 strata), score, model_a,
// model_b, text; with -month YYYY-MM also decided_at, a time in that
// month (-skip-days 17,18 leaves those days without rows). The same -seed
// always gives the same bytes.
package main

import (
	"bufio"
	"flag"
	"fmt"
	"io"
	"os"
	"strconv"
	"strings"

	"probity/sampling/loggen"
	"probity/sampling/safewrite"
)

func main() {
	var c loggen.Config
	var out string
	flag.IntVar(&c.Rows, "rows", 1000, "number of data rows")
	flag.Uint64Var(&c.Seed, "seed", 1, "generator seed")
	flag.StringVar(&c.Format, "format", "csv", "csv, tsv or jsonl")
	flag.BoolVar(&c.Gzip, "gzip", false, "gzip the output")
	flag.BoolVar(&c.Shuffle, "shuffle", false, "write the rows in a random order")
	flag.StringVar(&c.Month, "month", "", "add a decided_at column with times in this month, YYYY-MM")
	var skip string
	flag.StringVar(&skip, "skip-days", "", "with -month, days of the month without rows, e.g. 17,18")
	flag.StringVar(&out, "o", "-", "output file (- for stdout)")
	flag.Parse()
	for _, d := range strings.Split(skip, ",") {
		if d = strings.TrimSpace(d); d == "" {
			continue
		}
		v, err := strconv.Atoi(d)
		if err != nil || v < 1 || v > 31 {
			fmt.Fprintf(os.Stderr, "probity-genlog: -skip-days: %q is not a day of the month\n", d)
			os.Exit(2)
		}
		c.SkipDays = append(c.SkipDays, v)
	}
	if err := write(out, c); err != nil {
		fmt.Fprintln(os.Stderr, "probity-genlog:", err)
		os.Exit(1)
	}
}

func write(out string, c loggen.Config) error {
	if out == "-" {
		w := bufio.NewWriter(os.Stdout)
		if err := loggen.Write(w, c); err != nil {
			return err
		}
		return w.Flush()
	}
	return safewrite.Write([]safewrite.File{{Path: out, Stream: func(w io.Writer) error {
		bw := bufio.NewWriterSize(w, 1<<20)
		if err := loggen.Write(bw, c); err != nil {
			return err
		}
		return bw.Flush()
	}}}, safewrite.Options{Replace: true})
}
