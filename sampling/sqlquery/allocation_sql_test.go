package sqlquery

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"

	"probity/plan/inputerr"
	"probity/sampling"
)

// allocCase is one random stratum-count vector with allocation settings.
type allocCase struct {
	counts []sampling.StratumCount
	n      int
	rule   string
	k      int
	spare  int
}

// allocLabels are stratum labels chosen to test the byte-order tie-break:
// upper before lower case, "|" and non-ASCII after ASCII letters, the empty
// label first, and labels that a locale-aware collation would order
// differently ("a b" vs "ab", "B" vs "a").
var allocLabels = []string{"", "a", "B", "ab", "a b", "a|b", "é", "e", "Z", "(null)", "north|x", "south", "10", "9", "it's", `q"`}

// randomAllocCase draws a case: 1–12 strata of very unequal sizes (some of
// 1–3 rows, so that taking strata whole and the minimum per stratum both
// come into play), or many of equal size (so that remainders tie).
func randomAllocCase(r *rand.Rand) allocCase {
	h := 1 + r.IntN(12)
	perm := r.Perm(len(allocLabels))
	c := allocCase{rule: ruleProportional}
	if r.IntN(4) == 0 {
		c.rule = ruleEqual
	}
	equalSizes := r.IntN(4) == 0
	base := int64(1 + r.IntN(50))
	var total int64
	for i := 0; i < h && i < len(perm); i++ {
		var p int64
		switch {
		case equalSizes:
			p = base
		case r.IntN(3) == 0:
			p = 1 + r.Int64N(3)
		case r.IntN(2) == 0:
			p = 1 + r.Int64N(40)
		default:
			p = 1 + r.Int64N(100000)
		}
		c.counts = append(c.counts, sampling.StratumCount{Label: allocLabels[perm[i]], Population: p})
		total += p
	}
	c.n = 1 + r.IntN(int(min(total, 400)))
	if r.IntN(3) > 0 {
		c.k = r.IntN(6)
	}
	c.spare = r.IntN(4)
	return c
}

// TestAllocationMatchesGo checks the query's allocation against
// sampling.Allocate, the Go draw's, on many random stratum-count vectors:
// every n_h and every spare count must be equal.
func TestAllocationMatchesGo(t *testing.T) {
	pg := needPostgres(t)
	r := rand.New(rand.NewPCG(6, 2026))
	const cases = 600
	var script strings.Builder
	want := map[int][]sampling.StratumAllocation{}
	for i := 0; i < cases; i++ {
		c := randomAllocCase(r)
		got, err := sampling.Allocate(c.counts, c.n, sampling.AllocOptions{Rule: c.rule, MinPerStratum: c.k, Spare: c.spare})
		if err != nil {
			var in *inputerr.Error
			spare := errors.As(err, &in) && in.Field == "spare" // more spares than the sample size
			if !errors.Is(err, sampling.ErrAllocation) && !errors.Is(err, sampling.ErrSampleTooLarge) && !spare {
				t.Fatalf("case %d: %v", i, err)
			}
			continue // the importer refuses such counts with the Go error
		}
		want[i] = got
		script.WriteString(allocScript(t, i, c))
	}
	out, err := pg.run(script.String(), nil, "--csv", "-t")
	if err != nil {
		t.Fatal(err)
	}
	recs, err := csv.NewReader(bytes.NewReader(out)).ReadAll()
	if err != nil {
		t.Fatalf("reading psql output: %v", err)
	}
	got := map[int][]sampling.StratumAllocation{}
	for _, rec := range recs {
		i, _ := strconv.Atoi(rec[0])
		pop, _ := strconv.ParseInt(rec[2], 10, 64)
		ns, _ := strconv.Atoi(rec[3])
		sp, _ := strconv.Atoi(rec[4])
		got[i] = append(got[i], sampling.StratumAllocation{Label: rec[1], Population: pop, Sample: ns, Spare: sp})
	}
	if len(want) < cases/2 {
		t.Fatalf("only %d of %d cases were valid; the generator is off", len(want), cases)
	}
	for i, w := range want {
		g := got[i]
		if len(g) != len(w) {
			t.Errorf("case %d: %d strata from SQL, %d from Go", i, len(g), len(w))
			continue
		}
		for j := range w {
			if g[j].Label != w[j].Label || g[j].Population != w[j].Population || g[j].Sample != w[j].Sample || g[j].Spare != w[j].Spare {
				t.Errorf("case %d stratum %q: SQL n=%d spare=%d, Go n=%d spare=%d (N=%d)", i, w[j].Label, g[j].Sample, g[j].Spare, w[j].Sample, w[j].Spare, w[j].Population)
			}
		}
	}
}

// allocScript is one SELECT of the allocation CTEs on a VALUES table,
// printing "case,label,N_h,n_h,spares" in label byte order.
func allocScript(t *testing.T, i int, c allocCase) string {
	s := &Spec{Dialect: Postgres, SampleSize: c.n, Allocation: c.rule, MinPerStratum: c.k, Spare: c.spare}
	ctes, err := allocationCTEs(s)
	if err != nil {
		t.Fatal(err)
	}
	var vals []string
	for _, sc := range c.counts {
		lit, err := Postgres.QuoteLiteral(sc.Label)
		if err != nil {
			t.Fatal(err)
		}
		vals = append(vals, fmt.Sprintf("(%s, CAST(%d AS bigint))", lit, sc.Population))
	}
	return fmt.Sprintf("WITH RECURSIVE counts(stratum, n_pop) AS (VALUES %s),\n%s\nSELECT %d, stratum, n_pop, n_sample, n_spare FROM alloc ORDER BY stratum COLLATE \"C\";\n",
		strings.Join(vals, ", "), strings.TrimSuffix(ctes, ",\n"), i)
}
