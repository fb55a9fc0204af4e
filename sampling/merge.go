package sampling

import (
	"bytes"
	"fmt"
	"sort"
	"strings"

	"probity/plan/chrono"
	"probity/plan/inputerr"
)

// merge combines the workers' counts and heaps into the result: per
// stratum the Capacity smallest distinct keys, then repeats across strata,
// then the repeat events whose key is among the kept rows.
func (s *scanner) merge(workers []*worker) (*ScanResult, error) {
	res := &ScanResult{}
	if s.timeSlot >= 0 {
		res.Times = &chrono.DayCounter{}
	}
	labels := map[string]bool{}
	for _, w := range workers {
		res.Rows += w.rows
		if res.Times != nil {
			res.Times.Merge(&w.times)
		}
		for l := range w.strata {
			labels[l] = true
		}
	}
	sorted := make([]string, 0, len(labels))
	for l := range labels {
		sorted = append(sorted, l)
	}
	sort.Strings(sorted)
	var events []dupEvent
	for _, w := range workers {
		events = append(events, w.dups...)
	}
	strata := make([]StratumScan, len(sorted))
	var rowsInScope int64
	index := map[string]int{}
	for i, label := range sorted {
		index[label] = i
		st := StratumScan{Label: label}
		for _, w := range workers {
			ws, ok := w.strata[label]
			if !ok {
				continue
			}
			st.Count += ws.count
			rowsInScope += ws.count
			st.Rows = mergeRows(st.Rows, w.held[label], label, &events)
		}
		if len(st.Rows) > s.spec.Capacity {
			st.Rows = st.Rows[:s.spec.Capacity]
		}
		strata[i] = st
	}
	// Only repeats among the kept rows are certain to be seen whatever the
	// order of the rows and the split into chunks; keep exactly those.
	// Each repeat names the first line of its id (the row kept): a worker
	// that saw only later copies reported the earliest of those.
	kept := make([]map[[32]byte]int64, len(strata))
	for i := range strata {
		kept[i] = make(map[[32]byte]int64, len(strata[i].Rows))
		for _, r := range strata[i].Rows {
			kept[i][r.Key] = r.Line
		}
	}
	var valid []dupEvent
	for _, ev := range events {
		if first, ok := kept[index[ev.stratum]][ev.key]; ok {
			ev.kept = first
			valid = append(valid, ev)
			strata[index[ev.stratum]].Count--
		}
	}
	if s.distinct != nil {
		return s.mergeDistinct(res, strata, valid, rowsInScope)
	}
	// The same id in two strata (its stratum values differ between rows).
	type at struct{ stratum, row int }
	global := map[[32]byte]at{}
	removed := map[at]bool{}
	for i := range strata {
		for j, r := range strata[i].Rows {
			prev, ok := global[r.Key]
			if !ok {
				global[r.Key] = at{i, j}
				continue
			}
			p := strata[prev.stratum].Rows[prev.row]
			ev := dupEvent{key: r.Key, id: r.ID, kept: p.Line, other: r.Line, stratum: r.Stratum}
			drop := at{i, j}
			if r.Line < p.Line {
				ev.kept, ev.other, ev.stratum = r.Line, p.Line, p.Stratum
				drop = prev
				global[r.Key] = at{i, j}
			}
			removed[drop] = true
			strata[drop.stratum].Count--
			valid = append(valid, ev)
		}
	}
	if len(removed) > 0 {
		for i := range strata {
			out := strata[i].Rows[:0]
			for j, r := range strata[i].Rows {
				if !removed[at{i, j}] {
					out = append(out, r)
				}
			}
			strata[i].Rows = out
		}
	}
	res.Duplicates = duplicates(valid)
	if len(valid) > 0 {
		return nil, s.duplicateError(res.Duplicates)
	}
	res.Strata, res.InScope = nonEmpty(strata)
	return res, nil
}

// mergeDistinct completes merge under Dedupe from the distinct-id table:
// each stratum's population is the number of distinct ids whose first row
// in scope lies in it, and a kept row that is not its id's first row (a
// later row of an id first seen in another stratum) is dropped.
func (s *scanner) mergeDistinct(res *ScanResult, strata []StratumScan, events []dupEvent, rowsInScope int64) (*ScanResult, error) {
	counts := s.distinct.counts(len(s.numLabels))
	for i := range strata {
		st := &strata[i]
		n, ok := s.stratumNums[st.Label]
		if !ok {
			return nil, fmt.Errorf("internal: stratum %q has no number", st.Label)
		}
		st.Count = counts[n]
		out := st.Rows[:0]
		for _, r := range st.Rows {
			line, num, ok := s.distinct.first(&r.Key)
			if !ok {
				return nil, fmt.Errorf("internal: a kept row of line %d is not in the distinct-id table", r.Line)
			}
			if line == r.Line && num == n {
				out = append(out, r)
				continue
			}
			events = append(events, dupEvent{key: r.Key, stratum: s.numLabels[num], id: r.ID, kept: line, other: r.Line})
		}
		st.Rows = out
	}
	res.Duplicates = duplicates(events)
	res.Strata, res.InScope = nonEmpty(strata)
	res.Repeats = rowsInScope - res.InScope
	return res, nil
}

// duplicates sorts repeat events by the later line (then key) into the
// result's list.
func duplicates(events []dupEvent) []Duplicate {
	sort.Slice(events, func(a, b int) bool {
		if events[a].other != events[b].other {
			return events[a].other < events[b].other
		}
		return bytes.Compare(events[a].key[:], events[b].key[:]) < 0
	})
	var out []Duplicate
	for _, ev := range events {
		out = append(out, Duplicate{ID: ev.id, Stratum: ev.stratum, FirstLine: ev.kept, Line: ev.other})
	}
	return out
}

// nonEmpty keeps the strata with a population and sums it.
func nonEmpty(strata []StratumScan) ([]StratumScan, int64) {
	var out []StratumScan
	var total int64
	for _, st := range strata {
		if st.Count > 0 {
			out = append(out, st)
			total += st.Count
		}
	}
	return out, total
}

// mergeRows merges two runs of rows sorted by key into one; of two rows
// with the same key (a repeated id held by two workers) the one on the
// earlier line is kept and the other reported as a repeat.
func mergeRows(a, b []Row, label string, events *[]dupEvent) []Row {
	if len(a) == 0 {
		return b
	}
	out := make([]Row, 0, len(a)+len(b))
	for len(a) > 0 && len(b) > 0 {
		switch c := bytes.Compare(a[0].Key[:], b[0].Key[:]); {
		case c < 0:
			out = append(out, a[0])
			a = a[1:]
		case c > 0:
			out = append(out, b[0])
			b = b[1:]
		default:
			keep, other := a[0], b[0]
			if other.Line < keep.Line {
				keep, other = other, keep
			}
			*events = append(*events, dupEvent{key: keep.Key, stratum: label, id: keep.ID, kept: keep.Line, other: other.Line})
			out = append(out, keep)
			a, b = a[1:], b[1:]
		}
	}
	return append(append(out, a...), b...)
}

// duplicateError names the first few repeated ids and their lines.
func (s *scanner) duplicateError(d []Duplicate) *inputerr.Error {
	first := d[0]
	var b strings.Builder
	fmt.Fprintf(&b, "record id %s appears again (first on line %d)", quote(first.ID), first.FirstLine)
	if len(d) > 1 {
		fmt.Fprintf(&b, "; %d repeats among the rows that could be drawn: ", len(d))
		for i, x := range d {
			if i == 5 {
				b.WriteString(", …")
				break
			}
			if i > 0 {
				b.WriteString(", ")
			}
			fmt.Fprintf(&b, "%s (lines %d and %d)", quote(x.ID), x.FirstLine, x.Line)
		}
	}
	e := inputErrorf(s.spec.Name, int(first.Line), s.spec.IDColumn, "%s", b.String())
	e.Err = ErrDuplicateIDs
	e.Hint = "each record id must appear once"
	return e
}
