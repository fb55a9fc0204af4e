package labelserver

import (
	"sort"

	"probity/sampling/drawfolder"
	"probity/sampling/labeltrail"
)

// spareRule assigns spares to unsure items by the draw's fixed rule, the
// one the record's intake checks: within a stratum, spares are used in
// key order; each sample item marked unsure is replaced by the next spare,
// and a spare marked unsure by the one after it.
type spareRule struct {
	// mains and spares list each stratum's sample items (worksheet order)
	// and spares (key order).
	mains, spares [][]int
	stratum       map[int]int
	isSpare       map[int]bool
	// order is each item's position in the worksheet; items are all
	// items in that order.
	order map[int]int
	items []int
}

func newSpareRule(ledger []drawfolder.LedgerRow, strata map[string]int) *spareRule {
	r := &spareRule{mains: make([][]int, len(strata)), spares: make([][]int, len(strata)),
		stratum: map[int]int{}, isSpare: map[int]bool{}, order: map[int]int{}}
	keys := map[int]string{}
	for i, lr := range ledger {
		h := strata[lr.Stratum]
		r.stratum[lr.Item], r.order[lr.Item], keys[lr.Item] = h, i, lr.Key
		if lr.Spare {
			r.isSpare[lr.Item] = true
			r.spares[h] = append(r.spares[h], lr.Item)
		} else {
			r.mains[h] = append(r.mains[h], lr.Item)
		}
	}
	for h := range r.spares {
		s := r.spares[h]
		sort.SliceStable(s, func(a, b int) bool { return keys[s[a]] < keys[s[b]] })
	}
	for _, lr := range ledger {
		r.items = append(r.items, lr.Item)
	}
	sort.SliceStable(r.items, func(a, b int) bool { return r.order[r.items[a]] < r.order[r.items[b]] })
	return r
}

// labelOf reads an item's current label.
type labelOf func(item int) string

// assignment is the spares in use: for each assigned spare, the sample
// item it stands in for; blank is the assigned spares not labeled yet.
type assignment struct {
	spareFor map[int]int
	blank    map[int]bool
}

// assign applies the rule to the current labels: the unsure sample items
// of a stratum, in worksheet order, take its spares in key order; a spare
// labeled unsure passes its item on to the next spare.
func (r *spareRule) assign(label labelOf) assignment {
	a := assignment{spareFor: map[int]int{}, blank: map[int]bool{}}
	for h, spares := range r.spares {
		var queue []int
		for _, m := range r.mains[h] {
			if label(m) == drawfolder.Unsure {
				queue = append(queue, m)
			}
		}
		j := 0
		for _, s := range spares {
			if j >= len(queue) {
				break
			}
			a.spareFor[s] = queue[j]
			switch label(s) {
			case "":
				a.blank[s] = true
				j++
			case drawfolder.Unsure:
			default:
				j++
			}
		}
	}
	return a
}

// check says whether the labels meet the rule: a labeled spare is
// assigned, and no spare before it in its stratum's key order is blank.
// It returns the offending spare and the one to label first (0 if none).
func (r *spareRule) check(label labelOf) (bad, first int, ok bool) {
	a := r.assign(label)
	for _, spares := range r.spares {
		blank := 0
		for _, s := range spares {
			l := label(s)
			switch {
			case l == "" && blank == 0:
				blank = s
			case l == "":
			default:
				if _, in := a.spareFor[s]; !in {
					return s, 0, false
				}
				if blank != 0 {
					return s, blank, false
				}
			}
		}
	}
	return 0, 0, true
}

// sequence is the items a labeler goes through, in worksheet order: every
// sample item, then the assigned spares.
func (r *spareRule) sequence(a assignment) []int {
	items := make([]int, 0, len(r.items))
	for _, it := range r.items {
		if _, assigned := a.spareFor[it]; !r.isSpare[it] || assigned {
			items = append(items, it)
		}
	}
	return items
}

// cellLabel reads labels from a trail state's worksheet.
func cellLabel(st *labeltrail.State, sheet string) labelOf {
	return func(item int) string {
		if c := st.Cell(sheet, item); c != nil {
			return c.Label
		}
		return ""
	}
}
