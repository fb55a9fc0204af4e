// Package loggen writes synthetic prediction logs for tests and
// benchmarks: invented records with an id, two category columns (12
// strata in all), a score in [0, 1], two models' predicted labels and a
// short text. The same Config always gives the same bytes.
package loggen

import (
	"bufio"
	"compress/gzip"
	"fmt"
	"io"
	"math/rand/v2"
	"strconv"
	"time"
)

// Config describes a generated log.
type Config struct {
	// Rows is the number of data rows.
	Rows int
	// Seed seeds the generator (PCG); the same seed gives the same log.
	Seed uint64
	// Format is "csv" (default), "tsv" or "jsonl".
	Format string
	// Gzip compresses the output.
	Gzip bool
	// IDPrefix starts every record id (default "rec"); the row number
	// follows, zero-padded to 10 digits.
	IDPrefix string
	// Shuffle writes the rows in a random order (ids stay the same set).
	Shuffle bool
	// Month, when set (YYYY-MM), adds a last column TimeColumn with an
	// RFC 3339 time in that month (UTC) on every row; the other columns
	// are the same as without it. A row whose day is in SkipDays moves to
	// the next day not skipped, so those days have no row.
	Month    string
	SkipDays []int
}

// TimeColumn is the column Config.Month adds.
const TimeColumn = "decided_at"

// Regions and Channels are the two category columns; 4 × 3 = 12 strata.
var (
	Regions  = []string{"north", "south", "east", "west"}
	Channels = []string{"web", "app", "call"}
)

// Columns are the generated log's columns, in order.
var Columns = []string{"record_id", "region", "channel", "score", "model_a", "model_b", "text"}

// Write writes the log described by c to w.
func Write(w io.Writer, c Config) error {
	var zw *gzip.Writer
	if c.Gzip {
		zw = gzip.NewWriter(w)
		w = zw
	}
	bw := bufio.NewWriterSize(w, 1<<20)
	if c.IDPrefix == "" {
		c.IDPrefix = "rec"
	}
	sep := byte(',')
	switch c.Format {
	case "tsv":
		sep = '\t'
	case "jsonl":
		sep = 0
	}
	times, err := newTimes(c)
	if err != nil {
		return err
	}
	if sep != 0 {
		cols := Columns
		if times != nil {
			cols = append(append([]string{}, Columns...), TimeColumn)
		}
		for i, col := range cols {
			if i > 0 {
				bw.WriteByte(sep)
			}
			bw.WriteString(col)
		}
		bw.WriteByte('\n')
	}
	order := make([]int, 0)
	if c.Shuffle {
		order = rand.New(rand.NewPCG(c.Seed, 99)).Perm(c.Rows)
	}
	var line []byte
	for i := 0; i < c.Rows; i++ {
		idx := i
		if c.Shuffle {
			idx = order[i]
		}
		// Each row's values depend only on its index, so a shuffled log
		// holds the same rows.
		r := rand.New(rand.NewPCG(c.Seed, uint64(idx)))
		region := Regions[r.IntN(len(Regions))]
		channel := Channels[r.IntN(len(Channels))]
		score := float64(r.IntN(10000)) / 10000
		a, b := "ok", "ok"
		if score >= 0.5 {
			a = "fraud"
		}
		if score+0.1*(r.Float64()-0.5) >= 0.6 {
			b = "fraud"
		}
		id := appendPadded([]byte(c.IDPrefix), idx+1)
		line = line[:0]
		if sep == 0 {
			line = append(line, `{"record_id":"`...)
			line = append(line, id...)
			line = append(line, `","region":"`...)
			line = append(line, region...)
			line = append(line, `","channel":"`...)
			line = append(line, channel...)
			line = append(line, `","score":`...)
			line = strconv.AppendFloat(line, score, 'f', -1, 64)
			line = append(line, `,"model_a":"`...)
			line = append(line, a...)
			line = append(line, `","model_b":"`...)
			line = append(line, b...)
			line = append(line, `","text":"case `...)
			line = strconv.AppendInt(line, int64(r.IntN(100000)), 10)
			if times != nil {
				line = append(line, `","`+TimeColumn+`":"`...)
				line = times.append(line, r)
			}
			line = append(line, "\"}\n"...)
		} else {
			line = append(line, id...)
			line = append(line, sep)
			line = append(line, region...)
			line = append(line, sep)
			line = append(line, channel...)
			line = append(line, sep)
			line = strconv.AppendFloat(line, score, 'f', -1, 64)
			line = append(line, sep)
			line = append(line, a...)
			line = append(line, sep)
			line = append(line, b...)
			line = append(line, sep)
			line = append(line, "note for case "...)
			line = strconv.AppendInt(line, int64(r.IntN(100000)), 10)
			if times != nil {
				line = append(line, sep)
				line = times.append(line, r)
			}
			line = append(line, '\n')
		}
		if _, err := bw.Write(line); err != nil {
			return err
		}
	}
	if err := bw.Flush(); err != nil {
		return err
	}
	if zw != nil {
		return zw.Close()
	}
	return nil
}

// monthTimes draws a row's time in a month, skipping some days.
type monthTimes struct {
	start time.Time
	days  int
	skip  map[int]bool
}

func newTimes(c Config) (*monthTimes, error) {
	if c.Month == "" {
		return nil, nil
	}
	start, err := time.Parse("2006-01", c.Month)
	if err != nil {
		return nil, fmt.Errorf("month %q is not YYYY-MM", c.Month)
	}
	t := &monthTimes{start: start, days: int(start.AddDate(0, 1, 0).Sub(start).Hours() / 24), skip: map[int]bool{}}
	for _, d := range c.SkipDays {
		t.skip[d] = true
	}
	if len(t.skip) >= t.days {
		return nil, fmt.Errorf("every day of %s is skipped", c.Month)
	}
	return t, nil
}

// append appends a time drawn from r (after the row's other values, so
// they do not change).
func (t *monthTimes) append(b []byte, r *rand.Rand) []byte {
	sec := r.Int64N(int64(t.days) * 86400)
	day := int(sec/86400) + 1
	for t.skip[day] {
		day = day%t.days + 1
	}
	at := t.start.Add(time.Duration(int64(day-1)*86400+sec%86400) * time.Second)
	return at.AppendFormat(b, time.RFC3339)
}

// appendPadded appends v zero-padded to 10 digits.
func appendPadded(b []byte, v int) []byte {
	var d [20]byte
	s := strconv.AppendInt(d[:0], int64(v), 10)
	for i := len(s); i < 10; i++ {
		b = append(b, '0')
	}
	return append(b, s...)
}
