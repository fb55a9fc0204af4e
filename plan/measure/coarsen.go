package measure

import (
	"fmt"
	"strings"
)

// Coarsen merges the strata that every candidate predicts alike — for
// threshold candidates, the score bands between two consecutive
// thresholds — into one stratum each, in order of first appearance, with
// the composition summed accordingly; merged[h] is the new index of
// stratum h. The measures gain nothing from finer strata than these
// cells: every claim counts a sample proportional within each of its
// sides, so finer strata only move a side from the exact hypergeometric
// test of one stratum to the count rule over several, which is a little
// weaker (savings_test.go measures it). Strata the user wants for their
// own sake are kept apart by giving them distinct labels in a candidate of
// their own, or by not coarsening.
func Coarsen(p Population, c Composition) (Population, Composition, []int, error) {
	if err := p.Validate(); err != nil {
		return Population{}, Composition{}, nil, err
	}
	if err := c.Validate(p); err != nil {
		return Population{}, Composition{}, nil, err
	}
	merged := make([]int, len(p.Strata))
	index := map[string]int{}
	var out Population
	var oc Composition
	if c.Wrong != nil {
		oc.Wrong = make([][]int64, len(p.Candidates))
	}
	for h, s := range p.Strata {
		key := make([]byte, len(p.Candidates))
		for j, cand := range p.Candidates {
			key[j] = '-'
			if cand.Positive[h] {
				key[j] = '+'
			}
		}
		i, ok := index[string(key)]
		if !ok {
			i = len(out.Strata)
			index[string(key)] = i
			out.Strata = append(out.Strata, Stratum{})
			oc.Positives = append(oc.Positives, 0)
			for j := range oc.Wrong {
				oc.Wrong[j] = append(oc.Wrong[j], 0)
			}
		}
		merged[h] = i
		st := &out.Strata[i]
		if st.Label == "" {
			st.Label = s.Label
		} else {
			st.Label = strings.Join([]string{st.Label, s.Label}, " + ")
		}
		st.Population += s.Population
		oc.Positives[i] += c.Positives[h]
		for j := range oc.Wrong {
			oc.Wrong[j][i] += c.Wrong[j][h]
		}
	}
	for _, cand := range p.Candidates {
		nc := Candidate{Name: cand.Name, Positive: make([]bool, len(out.Strata))}
		for h, v := range cand.Positive {
			nc.Positive[merged[h]] = v
		}
		out.Candidates = append(out.Candidates, nc)
	}
	if err := out.Validate(); err != nil {
		return Population{}, Composition{}, nil, fmt.Errorf("coarsening: %w", err)
	}
	return out, oc, merged, nil
}
