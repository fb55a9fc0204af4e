package sequential

import (
	"testing"

	"probity/plan"
)

// small is a hand-made rule with T = 6 (common practice, no source):
//
//	t        1    2    3    4    5    6
//	accept  −1   −1    0    0    1    1
//	reject   –    2    2    3    3    2
func small(t *testing.T) *Rule {
	t.Helper()
	i := func(v int) *int { return &v }
	r, err := NewRule(&plan.SequentialRule{
		MaxSampleSize:         6,
		AcceptIfErrorsAtMost:  []int{-1, -1, 0, 0, 1, 1},
		RejectIfErrorsAtLeast: []*int{nil, i(2), i(2), i(3), i(3), i(2)},
	})
	if err != nil {
		t.Fatal(err)
	}
	return r
}

func TestJudge(t *testing.T) {
	r := small(t)
	cases := []struct {
		errs []bool
		want Decision
		at   int
	}{
		{[]bool{false, false, false}, Accept, 3},
		{[]bool{true, true}, Reject, 2},
		{[]bool{true, false, false, false, false}, Accept, 5},
		{[]bool{false, false, true, false, true}, Continue, 5},
		{[]bool{false, false, true, false, true, false}, Reject, 6},
		{[]bool{false, false, true, false, false, true, true}, Accept, 5},
		{[]bool{true}, Continue, 1},
		{nil, Continue, 0},
		{[]bool{true, false, true}, Reject, 3},
	}
	for _, c := range cases {
		d, at := r.Judge(c.errs)
		if d != c.want || at != c.at {
			t.Errorf("Judge(%v) = %s at %d, want %s at %d", c.errs, d, at, c.want, c.at)
		}
	}
}

// MaxRemaining against brute force: every error pattern from the state.
func TestMaxRemainingBruteForce(t *testing.T) {
	for _, r := range []*Rule{small(t), mustCurtailed(t, 12, 3), mustCurtailed(t, 9, 0)} {
		T := r.MaxSampleSize()
		for tt := 0; tt <= T; tt++ {
			for e := 0; e <= tt; e++ {
				got, err := r.MaxRemaining(tt, e)
				if err != nil {
					t.Fatal(err)
				}
				want := bruteMax(r, tt, e)
				if got != want {
					t.Errorf("T %d state (%d, %d): MaxRemaining %d, brute force %d", T, tt, e, got, want)
				}
			}
		}
	}
	if _, err := small(t).MaxRemaining(3, 4); err == nil {
		t.Error("e > t accepted")
	}
}

func bruteMax(r *Rule, t, e int) int {
	if r.At(t, e) != Continue {
		return 0
	}
	best := 0
	var walk func(u, e, steps int)
	walk = func(u, e, steps int) {
		if u == r.MaxSampleSize() || (steps > 0 && r.At(u, e) != Continue) {
			best = max(best, steps)
			return
		}
		walk(u+1, e, steps+1)
		walk(u+1, e+1, steps+1)
	}
	walk(t, e, 0)
	return best
}

func mustCurtailed(t *testing.T, n, c int) *Rule {
	t.Helper()
	rr, err := Curtailed(n, c)
	if err != nil {
		t.Fatal(err)
	}
	r, err := NewRule(rr)
	if err != nil {
		t.Fatal(err)
	}
	return r
}

func TestCurtailedDecisions(t *testing.T) {
	r := mustCurtailed(t, 10, 2)
	cases := []struct {
		t, e int
		want Decision
	}{
		{0, 0, Continue}, {2, 2, Continue}, {3, 3, Reject}, {7, 2, Continue}, {8, 0, Accept}, {8, 1, Continue},
		{9, 1, Accept}, {9, 2, Continue}, {10, 2, Accept}, {10, 3, Reject}, {5, 3, Reject},
	}
	for _, c := range cases {
		if got := r.At(c.t, c.e); got != c.want {
			t.Errorf("n 10 c 2 at (%d, %d): %s, want %s", c.t, c.e, got, c.want)
		}
	}
	if got := r.ToAcceptWithoutErrors(5, 1); got != 4 {
		t.Errorf("ToAcceptWithoutErrors(5, 1) = %d, want 4", got)
	}
	if got := r.ToRejectWithErrors(5, 1); got != 2 {
		t.Errorf("ToRejectWithErrors(5, 1) = %d, want 2", got)
	}
}
