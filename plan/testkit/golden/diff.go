package golden

import (
	"fmt"
	"strings"
)

// Diff describes how got differs from want: for text, the changed lines
// with three lines of context around each change (Myers' shortest edit
// script; "-" a golden line, "+" a line of got); for binary data, the sizes
// and the offset of the first differing byte. It returns "" when they are
// equal.
func Diff(want, got []byte) string {
	if string(want) == string(got) {
		return ""
	}
	if !isText(want) || !isText(got) {
		return binaryDiff(want, got)
	}
	a := strings.SplitAfter(string(want), "\n")
	b := strings.SplitAfter(string(got), "\n")
	ops := editScript(a, b, maxEdits)
	if ops == nil {
		i := firstDiffLine(a, b)
		return fmt.Sprintf("more than %d lines changed; the first is golden line %d:\n-%s+%s",
			maxEdits, i+1, showLine(at(a, i)), showLine(at(b, i)))
	}
	return hunks(ops)
}

const (
	// maxEdits bounds the edit script: beyond it, Diff names the first
	// changed line only.
	maxEdits = 1000
	// context is the number of unchanged lines shown around a change.
	context = 3
	// maxShown bounds the lines Diff prints.
	maxShown = 200
)

// edit is one line of an edit script: kept (' '), deleted from the golden
// file ('-') or inserted ('+').
type edit struct {
	kind byte
	line string
	// a and b are the line's 1-based numbers in the golden file and in got
	// (0 where it is absent).
	a, b int
}

// editScript is Myers' O((N+M)D) shortest edit script from a to b (E. W.
// Myers, "An O(ND) difference algorithm and its variations",
// Algorithmica 1, 1986), or nil when it needs more than max edits.
func editScript(a, b []string, max int) []edit {
	n, m := len(a), len(b)
	off := n + m + 1
	v := make([]int, 2*off+1)
	var trace [][]int // trace[d][k+d] is v[k] before step d, for |k| ≤ d
	for d := 0; d <= n+m; d++ {
		if d > max {
			return nil
		}
		trace = append(trace, append([]int(nil), v[off-d:off+d+1]...))
		for k := -d; k <= d; k += 2 {
			var x int
			if k == -d || (k != d && v[off+k-1] < v[off+k+1]) {
				x = v[off+k+1]
			} else {
				x = v[off+k-1] + 1
			}
			y := x - k
			for x < n && y < m && a[x] == b[y] {
				x, y = x+1, y+1
			}
			v[off+k] = x
			if x >= n && y >= m {
				return backtrack(a, b, trace, d)
			}
		}
	}
	return nil
}

// backtrack follows trace back from the end of a and b and returns the
// edits in order.
func backtrack(a, b []string, trace [][]int, dmax int) []edit {
	var rev []edit
	x, y := len(a), len(b)
	keep := func() { rev = append(rev, edit{' ', a[x-1], x, y}); x, y = x-1, y-1 }
	for d := dmax; d > 0; d-- {
		vp := func(k int) int { return trace[d][k+d] }
		k := x - y
		prevK := k - 1
		if k == -d || (k != d && vp(k-1) < vp(k+1)) {
			prevK = k + 1
		}
		prevX := vp(prevK)
		prevY := prevX - prevK
		if prevK == k+1 { // a line of b inserted
			for y > prevY+1 {
				keep()
			}
			rev = append(rev, edit{'+', b[y-1], 0, y})
			y--
		} else { // a line of a deleted
			for x > prevX+1 {
				keep()
			}
			rev = append(rev, edit{'-', a[x-1], x, 0})
			x--
		}
	}
	for x > 0 && y > 0 {
		keep()
	}
	ops := make([]edit, len(rev))
	for i, e := range rev {
		ops[len(rev)-1-i] = e
	}
	return ops
}

// hunks prints the changed edits with their context.
func hunks(ops []edit) string {
	var sb strings.Builder
	shown, last := 0, -1
	for i := 0; i < len(ops); i++ {
		if ops[i].kind == ' ' {
			continue
		}
		start := max(i-context, last+1)
		end := i
		for j := i; j < len(ops) && j <= end+2*context; j++ {
			if ops[j].kind != ' ' {
				end = j
			}
		}
		end = min(end+context, len(ops)-1)
		if start > 0 || last >= 0 {
			fmt.Fprintf(&sb, "@@ golden line %d, got line %d @@\n", lineA(ops, start), lineB(ops, start))
		}
		for j := start; j <= end; j++ {
			if shown == maxShown {
				fmt.Fprintf(&sb, "… (diff cut at %d lines)\n", maxShown)
				return sb.String()
			}
			sb.WriteString(string(ops[j].kind) + showLine(ops[j].line))
			shown++
		}
		last, i = end, end
	}
	return sb.String()
}

// lineA and lineB are the golden and got line numbers where ops[i] stands.
func lineA(ops []edit, i int) int {
	for ; i < len(ops); i++ {
		if ops[i].a > 0 {
			return ops[i].a
		}
	}
	return 0
}

func lineB(ops []edit, i int) int {
	for ; i < len(ops); i++ {
		if ops[i].b > 0 {
			return ops[i].b
		}
	}
	return 0
}

// showLine is a line as printed in a diff: ending in a newline, with a
// mark when the file's last line has none.
func showLine(l string) string {
	if strings.HasSuffix(l, "\n") {
		return l
	}
	return l + "\n\\ no newline at end of file\n"
}

func at(lines []string, i int) string {
	if i < len(lines) {
		return lines[i]
	}
	return ""
}

// firstDiffLine is the index of the first line where a and b differ.
func firstDiffLine(a, b []string) int {
	i := 0
	for i < len(a) && i < len(b) && a[i] == b[i] {
		i++
	}
	return i
}

// binaryDiff describes two differing byte strings.
func binaryDiff(want, got []byte) string {
	i := 0
	for i < len(want) && i < len(got) && want[i] == got[i] {
		i++
	}
	return fmt.Sprintf("binary data differs: golden %d bytes, got %d bytes; first difference at byte %d", len(want), len(got), i)
}
