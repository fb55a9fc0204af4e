package progress

import (
	"math/rand/v2"
	"strings"
	"testing"

	"probity/plan/sequential"
)

// Exact curtailment stops exactly when the full sample's verdict is
// settled: after an accept-stop, completing the sample with errors only
// still ends at ≤ c; after a reject-stop, completing it without errors
// still ends above c; and while it continues, one completion accepts and
// another rejects (so it never continues longer than needed). Random
// plans and label prefixes, seed fixed (common practice, no source).
func TestCurtailmentSettlesTheFullSampleVerdict(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 29))
	for trial := 0; trial < 400; trial++ {
		n := 1 + rng.IntN(40)
		c := rng.IntN(n)
		k := rng.IntN(n + 1)
		p := rng.Float64() * 0.6
		var b strings.Builder
		for i := 0; i < k; i++ {
			if rng.Float64() < p {
				b.WriteByte('x')
			} else {
				b.WriteByte('o')
			}
		}
		labels := b.String()
		res, err := Assess(fixture(n, c, 0, []string{"A"}, labelsOf(labels)))
		if err != nil {
			t.Fatal(err)
		}
		got := res.Candidates[0]
		// errors in the prefix up to the stop (or all of it)
		upto := k
		if got.Decision != sequential.Continue {
			upto = got.StoppedAt
		}
		e := strings.Count(labels[:upto], "x")
		worst := e + (n - upto) // every remaining item an error
		best := e               // none
		switch got.Decision {
		case sequential.Accept:
			if worst > c {
				t.Fatalf("n %d c %d labels %q: accept-stop at %d, but errors could reach %d", n, c, labels, upto, worst)
			}
		case sequential.Reject:
			if best <= c {
				t.Fatalf("n %d c %d labels %q: reject-stop at %d with %d errors ≤ c", n, c, labels, upto, best)
			}
		default:
			if worst <= c || best > c {
				t.Fatalf("n %d c %d labels %q: continues at %d although the verdict is settled (errors %d … %d)", n, c, labels, upto, best, worst)
			}
			// the longest completion (errors up to c, then none) decides
			// only at n
			if got.MaxRemaining != n-k {
				t.Fatalf("n %d c %d labels %q: max remaining %d, want %d", n, c, labels, got.MaxRemaining, n-k)
			}
		}
		// and no earlier prefix was already settled
		if got.Decision != sequential.Continue {
			pe := strings.Count(labels[:upto-1], "x")
			if pe+(n-upto+1) <= c || pe > c {
				t.Fatalf("n %d c %d labels %q: stopped at %d, but the verdict was settled at %d", n, c, labels, upto, upto-1)
			}
		}
	}
}
