package main

import (
	"errors"
	"fmt"
	"io"
	"math"
	"sort"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"probity/plan"
	"probity/plan/inputerr"
	"probity/plan/numfmt"
	"probity/plan/verdict"
	"probity/sampling"
)

// This file holds what the strata flags add to probity plan: a plan sized
// for the stratified design the draw will make, with the producer's risk of
// the rule the record will apply (the stratified count rule).

// planStrataOptions are the design flags of probity plan.
type planStrataOptions struct {
	sizes, anticipated, allocation, rounding string
	minPer                                   int
	minPerSet                                bool

	strata []verdict.Stratum // sorted by label
	rates  []float64         // per stratum, nil: the plan's p0
	shares bool
	// applied is the count rule on the planned design at the plan's n.
	applied *verdict.Applied
}

// nominalPopulation is the population strata given as shares are scaled
// to when the plan names none.
const nominalPopulation = 1_000_000

func addPlanStrataFlags(cmd *cobra.Command, o *planStrataOptions) {
	fl := cmd.Flags()
	fl.StringVar(&o.sizes, "stratum-sizes", "", "size the plan for a stratified draw: `LABEL=N,...` (stratum sizes, or shares summing to 1)")
	fl.StringVar(&o.allocation, "allocation", sampling.Proportional, "with --stratum-sizes, how the draw will divide n: `RULE` is proportional, neyman or equal")
	fl.IntVar(&o.minPer, "min-per-stratum", 1, "with --stratum-sizes, at least `k` items per stratum (default 1 when the sample has room)")
	fl.StringVar(&o.rounding, "rounding", sampling.RoundUp, "with --stratum-sizes and proportional allocation, shares rounded `up` or largest-remainder")
	fl.StringVar(&o.anticipated, "stratum-anticipated", "", "with --stratum-sizes, the anticipated error per stratum: `LABEL=P,...` (default --anticipated in every stratum)")
}

// validate reads the design flags; nothing is set when --stratum-sizes is
// not given (and the other design flags are then refused).
func (o *planStrataOptions) validate(cmd *cobra.Command, in plan.Inputs) error {
	changed := cmd.Flags().Changed
	o.minPerSet = changed("min-per-stratum")
	if o.sizes == "" {
		for _, f := range []string{"allocation", "min-per-stratum", "rounding", "stratum-anticipated"} {
			if changed(f) {
				return inputerr.Errorf("--%s describes a stratified design; give the strata with --stratum-sizes", f).WithHint("e.g. --stratum-sizes north=40000,south=25000,tunnels=3000")
			}
		}
		return nil
	}
	if in.Design == plan.DesignSequential {
		return inputerr.Errorf("--stratum-sizes cannot be used with --design sequential: a sequential plan is drawn without strata").WithHint("drop --stratum-sizes, or use --design fixed")
	}
	switch o.allocation {
	case sampling.Proportional, sampling.Equal, sampling.Neyman:
	default:
		return inputerr.Errorf("--allocation %s is not proportional, neyman or equal", o.allocation)
	}
	if o.rounding != sampling.RoundUp && o.rounding != sampling.RoundLargestRemainder {
		return inputerr.Errorf("--rounding %s is not %s or %s", o.rounding, sampling.RoundUp, sampling.RoundLargestRemainder)
	}
	if o.minPer < 0 {
		return inputerr.Errorf("--min-per-stratum %d is negative", o.minPer)
	}
	values, err := parseLabelValues("stratum-sizes", o.sizes)
	if err != nil {
		return err
	}
	if len(values) < 2 {
		return inputerr.Errorf("--stratum-sizes lists %d stratum; a stratified design needs at least two", len(values)).WithHint("drop --stratum-sizes for an unstratified draw")
	}
	labels := make([]string, 0, len(values))
	for l := range values {
		labels = append(labels, l)
	}
	sort.Strings(labels) // the draw's order: by label
	var sum float64
	integral := true
	for _, l := range labels {
		v := values[l]
		if !(v > 0) {
			return inputerr.Errorf("--stratum-sizes: stratum %q has size %v; every stratum needs a positive size", l, v)
		}
		sum += v
		integral = integral && v == math.Trunc(v)
	}
	o.shares = !integral || sum <= 1+1e-9
	total := float64(nominalPopulation)
	if in.Population > 0 {
		total = float64(in.Population)
	}
	if o.shares && math.Abs(sum-1) > 1e-6 {
		return inputerr.Errorf("--stratum-sizes: the shares sum to %v, not 1", sum).WithHint("give whole stratum sizes, or shares that sum to 1")
	}
	var N int64
	for _, l := range labels {
		size := int64(values[l])
		if o.shares {
			size = max(1, int64(math.Round(values[l]*total)))
		}
		o.strata = append(o.strata, verdict.Stratum{Label: l, Population: size})
		N += size
	}
	if in.Population > 0 && !o.shares && N != in.Population {
		return inputerr.Errorf("--stratum-sizes add up to %d but --population is %d", N, in.Population).WithHint("the strata divide the batch: make them add up to it, or give shares")
	}
	if o.anticipated != "" {
		rates, err := parseLabelValues("stratum-anticipated", o.anticipated)
		if err != nil {
			return err
		}
		for _, s := range o.strata {
			r, ok := rates[s.Label]
			if !ok {
				return inputerr.Errorf("--stratum-anticipated gives no anticipated error for stratum %q", s.Label)
			}
			if !(r >= 0 && r < 1) {
				return inputerr.Errorf("--stratum-anticipated: %v for stratum %q is outside [0, 1)", r, s.Label)
			}
			o.rates = append(o.rates, r)
		}
		if len(rates) != len(o.strata) {
			return inputerr.Errorf("--stratum-anticipated names a stratum that --stratum-sizes does not")
		}
	} else if o.allocation == sampling.Neyman {
		return inputerr.Errorf("--allocation neyman needs --stratum-anticipated: Neyman shares follow each stratum's anticipated error")
	}
	return nil
}

// parseLabelValues reads LABEL=NUMBER,LABEL=NUMBER.
func parseLabelValues(flag, s string) (map[string]float64, error) {
	out := map[string]float64{}
	for _, part := range strings.Split(s, ",") {
		label, val, ok := strings.Cut(part, "=")
		label = strings.TrimSpace(label)
		if !ok || label == "" {
			return nil, inputerr.Errorf("--%s %q: %q is not LABEL=NUMBER", flag, s, part)
		}
		if _, dup := out[label]; dup {
			return nil, inputerr.Errorf("--%s: stratum %q is listed twice", flag, label)
		}
		v, err := strconv.ParseFloat(strings.TrimSpace(val), 64)
		if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, inputerr.Errorf("--%s: %q is not a number", flag, val)
		}
		out[label] = v
	}
	return out, nil
}

// allocator allocates n over the planned strata as the draw will.
func (o *planStrataOptions) allocator() func(n int) ([]int, error) {
	counts := make([]sampling.StratumCount, len(o.strata))
	for h, s := range o.strata {
		counts[h] = sampling.StratumCount{Label: s.Label, Population: s.Population}
	}
	opts := sampling.AllocOptions{Rule: o.allocation, MinPerStratum: o.minPer, MinIfRoom: !o.minPerSet}
	if o.allocation == sampling.Proportional {
		opts.Rounding = o.rounding
	}
	if o.rates != nil {
		opts.Anticipated = map[string]float64{}
		for h, s := range o.strata {
			opts.Anticipated[s.Label] = max(o.rates[h], 1e-9) // Neyman needs p_h > 0
		}
	}
	return func(n int) ([]int, error) {
		a, err := sampling.Allocate(counts, n, opts)
		if err != nil {
			return nil, err
		}
		out := make([]int, len(a))
		for h := range a {
			out[h] = a[h].Sample
		}
		return out, nil
	}
}

// applyStrata resizes a plan built for a simple random sample to the
// stratified design: n, the count rule's acceptance number and its risks
// on the planned strata, and the stratification section.
func applyStrata(f *plan.File, o *planStrataOptions) error {
	if o.strata == nil {
		return nil
	}
	var N int64
	for _, s := range o.strata {
		N += s.Population
	}
	limit := int(min(N, plan.MaxSampleSize))
	srs := f.Rule.SampleSize
	n, d, a, err := verdict.SizeStratified(f, o.strata, o.rates, o.allocator(), srs, limit)
	if errors.Is(err, verdict.ErrDesignTooLarge) {
		return inputerr.Errorf("no sample of the planned strata (up to all %d decisions) gives the stratified count rule the producer's risk allowed", N).
			WithHint("relax --producer-risk, --anticipated or --ceiling, or choose an allocation closer to proportional").Wrap(err)
	}
	if err != nil {
		return inputerr.Errorf("the stratified design: %v", err)
	}
	o.applied = a
	st := &plan.Stratification{Allocation: o.allocation, MinPerStratum: o.minPer, SimpleRandomSampleSize: srs}
	if !o.minPerSet {
		st.MinPerStratum = 0
		total := 0
		for _, s := range d.Strata {
			total += int(min(s.Population, 1))
		}
		if total <= n {
			st.MinPerStratum = 1
		}
	}
	if o.allocation == sampling.Proportional {
		st.Rounding = o.rounding
	}
	for h, s := range d.Strata {
		r := 0.0
		switch {
		case o.rates != nil:
			r = o.rates[h]
		case f.Inputs.Anticipated != nil:
			r = *f.Inputs.Anticipated
		}
		st.Strata = append(st.Strata, plan.PlannedStratum{Label: s.Label, Population: s.Population, Anticipated: r})
		st.Sample = append(st.Sample, s.Sample)
		st.Counted = append(st.Counted, a.Count.Counted[h])
	}
	f.Stratification = st
	f.Rule.SampleSize = n
	f.Rule.AcceptanceNumber = a.Count.Accept
	f.Rule.ConsumerRisk = a.Count.ConsumerRiskBound()
	if f.Inputs.Anticipated != nil || o.rates != nil {
		pr := a.ProducerRisk
		f.Rule.ProducerRisk = &pr
	}
	return nil
}

// writeStrataReport prints the planned design and its rule.
func writeStrataReport(w io.Writer, f *plan.File, o *planStrataOptions) {
	st := f.Stratification
	if st == nil || o.applied == nil {
		return
	}
	a := o.applied
	how := st.Allocation
	if st.Rounding != "" {
		how += ", shares rounded " + map[string]string{sampling.RoundUp: "up", sampling.RoundLargestRemainder: "by largest remainder"}[st.Rounding]
	}
	if st.MinPerStratum > 0 {
		how += fmt.Sprintf(", at least %d per stratum", st.MinPerStratum)
	}
	fmt.Fprintf(w, "\nStratified design (%s), judged by the stratified count rule\n", how)
	if o.shares {
		fmt.Fprintf(w, "  (strata given as shares of a population of %d decisions)\n", a.Design.Population())
	}
	fmt.Fprintf(w, "  %-16s %10s %7s %8s  %s\n", "stratum", "N_h", "n_h", "counted", "anticipated")
	for h, s := range st.Strata {
		fmt.Fprintf(w, "  %-16s %10d %7d %8d  %s\n", s.Label, s.Population, st.Sample[h], st.Counted[h], numfmt.Setting(s.Anticipated))
	}
	fmt.Fprintf(w, "  accept a candidate with at most %d errors among the %d counted items; the consumer's risk is at most %s\n", a.Count.Accept, a.Count.CountedSize(), numfmt.ChanceUp(a.Count.ConsumerRiskBound()))
	fmt.Fprintf(w, "  wherever the errors sit (Hoeffding 1956 at the least favourable spread), and a stratum left without an item counts as unknown.\n")
	if f.Rule.ProducerRisk != nil {
		fmt.Fprintf(w, "  producer's risk %s at the anticipated errors (allowed %s); a simple random sample would need %d labels.\n", numfmt.Chance(*f.Rule.ProducerRisk), numfmt.Chance(f.Inputs.ProducerRisk), st.SimpleRandomSampleSize)
	} else {
		fmt.Fprintf(w, "  the smallest sample any count can pass; a simple random sample would need %d labels.\n", st.SimpleRandomSampleSize)
	}
}

// strataOC is the count rule's acceptance at each error rate (every
// stratum at that rate); ok is false for a plan without strata.
func strataOC(o *planStrataOptions, errs []float64) ([]float64, bool, error) {
	if o == nil || o.applied == nil {
		return nil, false, nil
	}
	pts, err := o.applied.OC(errs)
	if err != nil {
		return nil, true, &internalError{msg: "stratified OC: " + err.Error()}
	}
	out := make([]float64, len(pts))
	for i, p := range pts {
		out[i] = p.AcceptProbability
	}
	return out, true, nil
}
