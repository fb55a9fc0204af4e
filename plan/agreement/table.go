package agreement

import (
	"errors"
	"fmt"
)

// ErrClasses is returned for a class list an agreement table cannot be
// built on: fewer than two classes, an empty name or a repeated name.
var ErrClasses = errors.New("agreement needs at least two distinct, non-empty classes")

// Table is an agreement table on q classes: Counts[i][j] is the number of
// items the first labeler put in Classes[i] and the second labeler in
// Classes[j]. Rows are the first labeler, columns the second.
type Table struct {
	Classes []string
	Counts  [][]int
	index   map[string]int
}

// NewTable returns an empty q×q table on classes (q ≥ 2, names distinct
// and non-empty). The classes are the plan's full list, not only those
// observed, since AC1's chance agreement depends on q.
func NewTable(classes []string) (*Table, error) {
	if len(classes) < 2 {
		return nil, fmt.Errorf("%w: got %d", ErrClasses, len(classes))
	}
	t := &Table{
		Classes: append([]string(nil), classes...),
		Counts:  make([][]int, len(classes)),
		index:   make(map[string]int, len(classes)),
	}
	for i, c := range classes {
		if c == "" {
			return nil, fmt.Errorf("%w: class %d is empty", ErrClasses, i+1)
		}
		if _, dup := t.index[c]; dup {
			return nil, fmt.Errorf("%w: class %q appears twice", ErrClasses, c)
		}
		t.index[c] = i
		t.Counts[i] = make([]int, len(classes))
	}
	return t, nil
}

// TableFromCounts builds a table from a square matrix of non-negative
// counts (rows: first labeler, columns: second), copying it.
func TableFromCounts(classes []string, counts [][]int) (*Table, error) {
	t, err := NewTable(classes)
	if err != nil {
		return nil, err
	}
	if len(counts) != len(classes) {
		return nil, fmt.Errorf("agreement table has %d rows for %d classes", len(counts), len(classes))
	}
	for i, row := range counts {
		if len(row) != len(classes) {
			return nil, fmt.Errorf("agreement table row %d has %d cells for %d classes", i+1, len(row), len(classes))
		}
		for j, v := range row {
			if v < 0 {
				return nil, fmt.Errorf("agreement table cell (%d,%d) is negative: %d", i+1, j+1, v)
			}
			t.Counts[i][j] = v
		}
	}
	return t, nil
}

// Has reports whether label is one of the table's classes.
func (t *Table) Has(label string) bool {
	_, ok := t.index[label]
	return ok
}

// Add counts one item labeled first by the first labeler and second by
// the second. Both must be classes of the table.
func (t *Table) Add(first, second string) error {
	i, ok := t.index[first]
	if !ok {
		return fmt.Errorf("label %q is not one of the classes", first)
	}
	j, ok := t.index[second]
	if !ok {
		return fmt.Errorf("label %q is not one of the classes", second)
	}
	t.Counts[i][j]++
	return nil
}

// N is the number of items in the table.
func (t *Table) N() int {
	n := 0
	for _, row := range t.Counts {
		for _, v := range row {
			n += v
		}
	}
	return n
}

// Agreed is the number of items on the diagonal (both labelers gave the
// same class).
func (t *Table) Agreed() int {
	a := 0
	for i := range t.Counts {
		a += t.Counts[i][i]
	}
	return a
}

// proportions returns p_ij = n_ij/n, the row margins p_i. (first labeler)
// and the column margins p_.j (second labeler). n must be > 0.
func (t *Table) proportions() (p [][]float64, row, col []float64) {
	q := len(t.Classes)
	n := float64(t.N())
	p = make([][]float64, q)
	row = make([]float64, q)
	col = make([]float64, q)
	for i := range q {
		p[i] = make([]float64, q)
		for j := range q {
			p[i][j] = float64(t.Counts[i][j]) / n
			row[i] += p[i][j]
			col[j] += p[i][j]
		}
	}
	return p, row, col
}

// ObservedAgreement is p_o = Σ_i n_ii / n, the share of items on which the
// two labelers gave the same class; 0 for an empty table.
func (t *Table) ObservedAgreement() float64 {
	n := t.N()
	if n == 0 {
		return 0
	}
	return float64(t.Agreed()) / float64(n)
}
