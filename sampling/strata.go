package sampling

import (
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"
)

// AllStratum is the label of the single stratum of an unstratified draw.
const AllStratum = "all"

// Band splits a numeric column (a score in [0, 1]) into interval strata at
// the given edges: --band score=0.5,0.9 makes [0,0.5), [0.5,0.9), [0.9,1].
type Band struct {
	Column string
	Edges  []float64
}

// ParseBand parses "COLUMN=EDGE1,EDGE2,…". Edges must be strictly
// increasing and inside (0, 1).
func ParseBand(s string) (Band, error) {
	col, list, ok := strings.Cut(s, "=")
	col = strings.TrimSpace(col)
	if !ok || col == "" || strings.TrimSpace(list) == "" {
		return Band{}, fmt.Errorf("band %q is not COLUMN=EDGE1,EDGE2,…", s)
	}
	b := Band{Column: col}
	for _, e := range strings.Split(list, ",") {
		v, err := strconv.ParseFloat(strings.TrimSpace(e), 64)
		if err != nil || !(v > 0 && v < 1) {
			return Band{}, fmt.Errorf("band %q: edge %q is not a number strictly between 0 and 1", s, e)
		}
		if n := len(b.Edges); n > 0 && v <= b.Edges[n-1] {
			return Band{}, fmt.Errorf("band %q: edges must increase (%v after %v)", s, v, b.Edges[n-1])
		}
		b.Edges = append(b.Edges, v)
	}
	return b, nil
}

// String is the band's definition, as parsed.
func (b Band) String() string {
	parts := make([]string, len(b.Edges))
	for i, e := range b.Edges {
		parts[i] = formatFloat(e)
	}
	return b.Column + "=" + strings.Join(parts, ",")
}

// Labels returns the interval labels, lowest first: "[0,e1)", …, "[ek,1]".
func (b Band) Labels() []string {
	lo := "0"
	out := make([]string, 0, len(b.Edges)+1)
	for _, e := range b.Edges {
		out = append(out, "["+lo+","+formatFloat(e)+")")
		lo = formatFloat(e)
	}
	return append(out, "["+lo+",1]")
}

// Index returns the interval holding v, or −1 when v is outside [0, 1]
// or not a number.
func (b Band) Index(v float64) int {
	if !(v >= 0 && v <= 1) || math.IsNaN(v) {
		return -1
	}
	return sort.Search(len(b.Edges), func(i int) bool { return b.Edges[i] > v })
}

// Midpoint returns the midpoint of interval i.
func (b Band) Midpoint(i int) float64 {
	lo, hi := 0.0, 1.0
	if i > 0 {
		lo = b.Edges[i-1]
	}
	if i < len(b.Edges) {
		hi = b.Edges[i]
	}
	return (lo + hi) / 2
}

// Filter keeps only rows whose Column holds one of Values (--where).
type Filter struct {
	Column string
	Values []string
}

// ParseFilter parses "COLUMN=V1,V2,…".
func ParseFilter(s string) (Filter, error) {
	col, list, ok := strings.Cut(s, "=")
	col = strings.TrimSpace(col)
	if !ok || col == "" {
		return Filter{}, fmt.Errorf("filter %q is not COLUMN=VALUE[,VALUE…]", s)
	}
	return Filter{Column: col, Values: strings.Split(list, ",")}, nil
}

// String is the filter's definition.
func (f Filter) String() string { return f.Column + "=" + strings.Join(f.Values, ",") }

// formatFloat writes a band edge as the shortest decimal that reads back
// to the same float64, never with an exponent.
func formatFloat(v float64) string { return strconv.FormatFloat(v, 'f', -1, 64) }
