package sequential

import (
	"errors"
	"flag"
	"fmt"
	"math"
	"strings"
	"testing"
)

var table = flag.Bool("table", false, "print the ASN/n table of sequential against fixed plans")

// The example: ceiling 0.02, anticipated 0.01, confidence 0.95,
// producer's risk 0.10, fixed n = 1271. Target: ASN at p0 ≤ 65 % of n and
// at the ceiling ≤ 50 %, with both exact risks kept.
func TestSearchMeetsTargetOnExample(t *testing.T) {
	spec := Spec{Ceiling: 0.02, Anticipated: 0.01, ConsumerRisk: 0.05, ProducerRisk: 0.10, FixedSampleSize: 1271}
	d, err := Search(spec)
	if err != nil {
		t.Fatal(err)
	}
	checkDesign(t, spec, d)
	if r := d.ASNAtAnticipated / 1271; r > 0.65 {
		t.Errorf("ASN at p0 = %.1f = %.3f n, target ≤ 0.65", d.ASNAtAnticipated, r)
	}
	if r := d.ASNAtCeiling / 1271; r > 0.50 {
		t.Errorf("ASN at ceiling = %.1f = %.3f n, target ≤ 0.50", d.ASNAtCeiling, r)
	}
	if d.Rule.MaxSampleSize > 2*1271 {
		t.Errorf("truncation %d above the default cap 2n", d.Rule.MaxSampleSize)
	}
}

// checkDesign re-evaluates a design independently of the search's own
// bookkeeping: both exact risks within the spec, the stored ASNs equal to
// a fresh evaluation, the boundaries meeting at T.
func checkDesign(t *testing.T, spec Spec, d *Design) {
	t.Helper()
	good, bad := spec.models()
	pg, err := Evaluate(d.Rule, good)
	if err != nil {
		t.Fatal(err)
	}
	pb, _ := Evaluate(d.Rule, bad)
	if pb.Accept > spec.ConsumerRisk {
		t.Errorf("consumer's risk %.6g above %v", pb.Accept, spec.ConsumerRisk)
	}
	if pg.Reject > spec.ProducerRisk {
		t.Errorf("producer's risk %.6g above %v", pg.Reject, spec.ProducerRisk)
	}
	if pg.ASN != d.Rule.ASNAtAnticipated || pb.ASN != d.Rule.ASNAtCeiling || pb.Accept != d.ConsumerRisk || pg.Reject != d.ProducerRisk {
		t.Errorf("stored figures differ from a fresh evaluation")
	}
	T := d.Rule.MaxSampleSize
	if a, r := d.Rule.AcceptIfErrorsAtMost[T-1], d.Rule.RejectIfErrorsAtLeast[T-1]; r == nil || *r != a+1 {
		t.Errorf("boundaries do not meet at T")
	}
}

func TestSearchFiniteLot(t *testing.T) {
	// a lot of 20 000 with D1 = 400 (ceiling 0.02) and D0 = 200 (0.01);
	// the fixed hypergeometric plan for these risks is below the
	// binomial 1271, so n = 1271 is a safe (not minimal) reference here.
	spec := Spec{Ceiling: 0.02, Anticipated: 0.01, ConsumerRisk: 0.05, ProducerRisk: 0.10, FixedSampleSize: 1271,
		Population: 20000, BadLotErrors: 400, GoodLotErrors: 200}
	d, err := Search(spec)
	if err != nil {
		t.Fatal(err)
	}
	checkDesign(t, spec, d)
}

func TestSearchBadSpec(t *testing.T) {
	ok := Spec{Ceiling: 0.02, Anticipated: 0.01, ConsumerRisk: 0.05, ProducerRisk: 0.10, FixedSampleSize: 1271}
	muts := map[string]func(*Spec){
		"anticipated at ceiling": func(s *Spec) { s.Anticipated = 0.02 },
		"no anticipated":         func(s *Spec) { s.Anticipated = 0 },
		"ceiling 1":              func(s *Spec) { s.Ceiling = 1 },
		"risk 0":                 func(s *Spec) { s.ConsumerRisk = 0 },
		"risks sum 1":            func(s *Spec) { s.ConsumerRisk, s.ProducerRisk = 0.5, 0.5 },
		"no fixed n":             func(s *Spec) { s.FixedSampleSize = 0 },
		"cap below n":            func(s *Spec) { s.MaxSampleSize = 100 },
		"lot below n":            func(s *Spec) { s.Population, s.BadLotErrors, s.GoodLotErrors = 1000, 20, 10 },
		"lot D0 ≥ D1":            func(s *Spec) { s.Population, s.BadLotErrors, s.GoodLotErrors = 20000, 200, 200 },
	}
	big := ok
	big.FixedSampleSize = MaxFixedSampleSize + 1
	if _, err := Search(big); !errors.Is(err, ErrTooLarge) {
		t.Errorf("too large: err = %v, want ErrTooLarge", err)
	}
	for name, mut := range muts {
		s := ok
		mut(&s)
		if _, err := Search(s); !errors.Is(err, ErrDomain) {
			t.Errorf("%s: err = %v, want ErrDomain", name, err)
		}
	}
}

// TestASNTable prints, with -table, the ASN of the searched sequential
// plan as a fraction of the fixed plan's n for several plans (anticipated
// error = ceiling/2 and ceiling/5, confidence 0.95, producer's risk 0.10,
// M = 1 and 10 under Bonferroni). Without -table it runs the cheapest rows
// only. Every row's risks are re-checked.
func TestASNTable(t *testing.T) {
	ceilings := []float64{0.001, 0.005, 0.01, 0.02, 0.05}
	ms := []int{1, 10}
	ratios := []float64{2, 5}
	if !*table {
		ceilings, ms = []float64{0.05}, []int{1, 10}
	}
	var b strings.Builder
	fmt.Fprintf(&b, "\n| ceiling | p0 | M | fixed n (c) | max labels T | ASN at p0 | ASN/n | ASN at ceiling | ASN/n | consumer's risk | producer's risk |\n|---|---|---|---|---|---|---|---|---|---|---|\n")
	for _, ratio := range ratios {
		for _, M := range ms {
			for _, p1 := range ceilings {
				p0 := p1 / ratio
				alpha := 0.05 / float64(M)
				n, c := fixedPlan(t, p0, p1, alpha, 0.10)
				spec := Spec{Ceiling: p1, Anticipated: p0, ConsumerRisk: alpha, ProducerRisk: 0.10, FixedSampleSize: n}
				d, err := Search(spec)
				if err != nil {
					t.Fatal(err)
				}
				checkDesign(t, spec, d)
				fmt.Fprintf(&b, "| %g | %g | %d | %d (%d) | %d | %.0f | %.3f | %.0f | %.3f | %.5f | %.5f |\n", p1, p0, M, n, c,
					d.Rule.MaxSampleSize, d.ASNAtAnticipated, d.ASNAtAnticipated/float64(n), d.ASNAtCeiling, d.ASNAtCeiling/float64(n),
					d.ConsumerRisk, d.ProducerRisk)
				if d.ASNAtAnticipated >= float64(n) || d.ASNAtCeiling >= float64(n) || math.IsNaN(d.ASNAtCeiling) {
					t.Errorf("ceiling %v M %d: sequential ASN not below fixed n", p1, M)
				}
			}
		}
	}
	t.Log(b.String())
}

// A very small per-candidate risk (confidence 0.999 with M = 100:
// 1e-5) puts Wald's lines about 20 errors apart at the truncation point;
// the search must place the final acceptance number inside that gap, not
// at the reject line (regression: no plan was found).
func TestSearchTinyRisk(t *testing.T) {
	n, _ := fixedPlan(t, 0.01, 0.02, 1e-5, 0.10)
	spec := Spec{Ceiling: 0.02, Anticipated: 0.01, ConsumerRisk: 1e-5, ProducerRisk: 0.10, FixedSampleSize: n}
	d, err := Search(spec)
	if err != nil {
		t.Fatal(err)
	}
	checkDesign(t, spec, d)
	if d.ASNAtAnticipated >= float64(n) || d.ASNAtCeiling >= float64(n) {
		t.Errorf("no saving: ASN %.0f, %.0f vs n %d", d.ASNAtAnticipated, d.ASNAtCeiling, n)
	}
}
