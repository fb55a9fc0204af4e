package drawfolder

import "sort"

// SpareRule is the draw's fixed rule for spares, the one the labeling
// page, progress and the record all apply, so that which spare replaces
// which item is never anyone's choice: within a stratum, the sample items
// marked unsure take, in worksheet order, the stratum's spares in key
// order (the order they were drawn in), one spare each; a spare that is
// itself marked unsure is passed over and its item takes the next spare.
// A spare the rule gives no item replaces nothing: labeled or not, it is
// unused, never an error. Only an item marked unsure is replaced; an item
// left blank is not labeled yet.
type SpareRule struct {
	// mains and spares list each stratum's sample items (worksheet
	// order) and spares (key order), by item number.
	mains, spares [][]int
}

// NewSpareRule reads the rule's order from the ledger (in worksheet
// order): the strata in order of their first item.
func NewSpareRule(ledger []LedgerRow) *SpareRule {
	index := map[string]int{}
	r := &SpareRule{}
	keys := map[int]string{}
	for _, lr := range ledger {
		h, ok := index[lr.Stratum]
		if !ok {
			h = len(r.mains)
			index[lr.Stratum] = h
			r.mains, r.spares = append(r.mains, nil), append(r.spares, nil)
		}
		keys[lr.Item] = lr.Key
		if lr.Spare {
			r.spares[h] = append(r.spares[h], lr.Item)
		} else {
			r.mains[h] = append(r.mains[h], lr.Item)
		}
	}
	for _, s := range r.spares {
		sort.SliceStable(s, func(a, b int) bool { return keys[s[a]] < keys[s[b]] })
	}
	return r
}

// SpareStep is one spare the rule gave an item: Spare stands in for the
// sample item Item, which was marked unsure. Label is the spare's own
// label: a class (the spare replaces the item), blank (not labeled yet:
// the item waits for it) or unsure (passed over: the item went on to the
// next spare).
type SpareStep struct {
	Item, Spare int
	Label       LabelKind
}

// SpareUse is the rule applied to a worksheet's labels.
type SpareUse struct {
	// Steps are the spares given an item, stratum by stratum in key
	// order.
	Steps []SpareStep
	// Unreplaced are the sample items marked unsure that no spare
	// replaces (the stratum's spares ran out, or the spare given them is
	// blank or unsure and none follows), in worksheet order per stratum.
	Unreplaced []int
	// Unused are the labeled spares the rule gave no item.
	Unused []int
}

// Assign applies the rule to the labels kind returns for each item (its
// LabelKind; LabelInvalid is taken as a class, which the caller refuses
// on its own terms).
func (r *SpareRule) Assign(kind func(item int) LabelKind) SpareUse {
	var u SpareUse
	for h, spares := range r.spares {
		var queue []int
		for _, m := range r.mains[h] {
			if kind(m) == LabelUnsure {
				queue = append(queue, m)
			}
		}
		j := 0
		for _, s := range spares {
			k := kind(s)
			if j >= len(queue) {
				if k != LabelBlank {
					u.Unused = append(u.Unused, s)
				}
				continue
			}
			switch k {
			case LabelBlank:
				u.Steps = append(u.Steps, SpareStep{Item: queue[j], Spare: s, Label: LabelBlank})
				u.Unreplaced = append(u.Unreplaced, queue[j])
				j++
			case LabelUnsure:
				u.Steps = append(u.Steps, SpareStep{Item: queue[j], Spare: s, Label: LabelUnsure})
			default:
				u.Steps = append(u.Steps, SpareStep{Item: queue[j], Spare: s, Label: LabelClass})
				j++
			}
		}
		u.Unreplaced = append(u.Unreplaced, queue[j:]...)
	}
	return u
}
