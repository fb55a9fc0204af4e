package verdict

import (
	"sort"

	"probity/plan/record"
)

// Confusion builds a confusion matrix: Counts[i][j] is the number of items
// whose true label is Classes[i] and whose prediction is Classes[j].
// Classes are the plan's classes in plan order, followed by any other
// value seen as a label or a prediction, sorted by byte order.
func Confusion(classes []string, labels, predictions []string) record.Confusion {
	all := append([]string{}, classes...)
	index := map[string]int{}
	for i, c := range all {
		index[c] = i
	}
	var extra []string
	seen := map[string]bool{}
	for _, l := range [][]string{labels, predictions} {
		for _, v := range l {
			if _, ok := index[v]; !ok && !seen[v] {
				seen[v] = true
				extra = append(extra, v)
			}
		}
	}
	sort.Strings(extra)
	for _, v := range extra {
		index[v] = len(all)
		all = append(all, v)
	}
	counts := make([][]int, len(all))
	for i := range counts {
		counts[i] = make([]int, len(all))
	}
	for k := range labels {
		counts[index[labels[k]]][index[predictions[k]]]++
	}
	return record.Confusion{Classes: all, Counts: counts}
}
