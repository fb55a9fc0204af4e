package plan

import (
	"strconv"
)

// DefaultProducerRisk is the producer's risk used when none is given.
const DefaultProducerRisk = 0.10

// Validate checks every input against its allowed range and returns an
// *inputerr.Error naming the first one out of range.
func (in Inputs) Validate() error {
	open01 := func(field string, v float64) error {
		if !(v > 0 && v < 1) {
			return outOfRange(field, fmtNum(v), "between 0 and 1 (exclusive)")
		}
		return nil
	}
	if err := open01("ceiling", in.Ceiling); err != nil {
		return err
	}
	if err := open01("confidence", in.Confidence); err != nil {
		return err
	}
	if in.CandidateCount < 1 {
		return outOfRange("candidates", strconv.Itoa(in.CandidateCount), "at least 1")
	}
	if p0 := in.Anticipated; p0 != nil && !(*p0 >= 0 && *p0 < in.Ceiling) {
		return outOfRange("anticipated", fmtNum(*p0), "at least 0 and below the ceiling "+fmtNum(in.Ceiling))
	}
	if err := open01("producer-risk", in.ProducerRisk); err != nil {
		return err
	}
	if in.Population < 0 {
		return outOfRange("population", strconv.FormatInt(in.Population, 10), "at least 1 (or omitted for an unbounded stream)")
	}
	if !methodSpelling.known(in.Method) {
		return methodSpelling.invalid(in.Method.String())
	}
	if !multiplicitySpelling.known(in.Multiplicity) {
		return multiplicitySpelling.invalid(in.Multiplicity.String())
	}
	if !designSpelling.known(in.Design) {
		return designSpelling.invalid(in.Design.String())
	}
	if !requireSpelling.known(in.Require) {
		return requireSpelling.invalid(in.Require.String())
	}
	return nil
}

// Size computes the acceptance rule of the chosen method and the sample
// size every rule would need for the same inputs. The inputs are
// validated first.
//
// Every rule is of the form "accept when errors ≤ c"; each method supplies
// its own consumer's guarantee at the per-candidate risk α = δ/M' (see
// rules.go), and with an anticipated error p0 every rule must also keep the
// exact producer's risk P(errors > c | p0) ≤ β, so the comparison is like
// for like. Without p0 the plan is the smallest rule any count can pass: c
// = 0 for the exact test.
func Size(in Inputs) (Rule, []RuleSize, error) {
	if err := in.Validate(); err != nil {
		return Rule{}, nil, err
	}
	alpha := in.PerCandidateRisk()
	s := sizer{in: in, alpha: alpha}
	chosen := s.methodRule(in.Method)
	res := s.search(chosen)
	if res.tooLarge {
		return Rule{}, nil, s.tooLarge(res)
	}
	if in.Population > 0 && int64(res.n) >= in.Population {
		return Rule{}, nil, tooLargeError(&TooLargeError{Limit: res.n, Population: in.Population, Relax: s.relax(true)})
	}
	rule := s.rule(res)
	var cmp []RuleSize
	if in.Population > 0 {
		cmp = append(cmp, s.row(RuleExactHypergeometric, s.exactRule()))
	}
	cmp = append(cmp,
		s.row(RuleExactBinomial, exactBinomialKeeps(in.Ceiling, alpha)),
		s.row(RuleKL, klKeeps(in.Ceiling, alpha)),
		s.row(RuleHoeffding, hoeffdingKeeps(in.Ceiling, alpha)),
		s.row(RuleChebyshev, chebyshevKeeps(in.Ceiling, alpha)),
	)
	return rule, cmp, nil
}

// sizer holds the derived quantities of one sizing.
type sizer struct {
	in    Inputs
	alpha float64
}

// exactRule is the exact test: hypergeometric for a lot, else binomial.
func (s sizer) exactRule() func(c, n int) bool {
	if s.in.Population > 0 {
		return exactHypergeometricKeeps(s.in.Population, BadLotErrors(s.in.Population, s.in.Ceiling), s.alpha)
	}
	return exactBinomialKeeps(s.in.Ceiling, s.alpha)
}

func (s sizer) methodRule(method Method) func(c, n int) bool {
	switch method {
	case MethodHoeffding:
		return hoeffdingKeeps(s.in.Ceiling, s.alpha)
	case MethodKL:
		return klKeeps(s.in.Ceiling, s.alpha)
	}
	return s.exactRule()
}

// search runs the family search with the producer's risk under the plan's
// probability model (hypergeometric at D0 for a lot, else binomial at p0).
func (s sizer) search(keeps func(c, n int) bool) searchResult {
	f := family{keeps: keeps, beta: s.in.ProducerRisk, limit: MaxSampleSize}
	if s.in.Population > 0 {
		f.limit = int(min(s.in.Population, MaxSampleSize))
	}
	f.producerRisk = s.producerRisk()
	return f.search()
}

// producerRisk is P(reject | p0) as a function of (c, n); nil without p0.
func (s sizer) producerRisk() func(c, n int) float64 {
	if s.in.Anticipated == nil {
		return nil
	}
	p0 := *s.in.Anticipated
	if s.in.Population > 0 {
		d0 := GoodLotErrors(s.in.Population, p0)
		return func(c, n int) float64 { return HypergeometricSF(c, s.in.Population, d0, n) }
	}
	return func(c, n int) float64 { return BinomialSF(c, n, p0) }
}

// row is one comparison row: the rule's n, or 0 when out of reach. For a
// lot, every rule is held to the lot (its n may not exceed N).
func (s sizer) row(name string, keeps func(c, n int) bool) RuleSize {
	if name == RuleExactBinomial && s.in.Population > 0 {
		// the binomial test ignores the lot: size it as for a stream.
		t := s
		t.in.Population = 0
		res := t.search(keeps)
		if res.tooLarge {
			return RuleSize{Rule: name}
		}
		return RuleSize{Rule: name, SampleSize: int64(res.n)}
	}
	res := s.search(keeps)
	if res.tooLarge || (s.in.Population > 0 && int64(res.n) >= s.in.Population) {
		return RuleSize{Rule: name}
	}
	return RuleSize{Rule: name, SampleSize: int64(res.n)}
}

// rule assembles the Rule for a search result with its actual risks.
func (s sizer) rule(res searchResult) Rule {
	r := Rule{SampleSize: res.n, AcceptanceNumber: res.c, PerCandidateRisk: s.alpha}
	r.Model = s.in.Method.Model(s.in.Population)
	if s.in.Population > 0 {
		r.BadLotErrors = BadLotErrors(s.in.Population, s.in.Ceiling)
		r.ConsumerRisk = HypergeometricCDF(res.c, s.in.Population, r.BadLotErrors, res.n)
		if s.in.Anticipated != nil {
			r.GoodLotErrors = GoodLotErrors(s.in.Population, *s.in.Anticipated)
		}
	} else {
		r.ConsumerRisk = BinomialCDF(res.c, res.n, s.in.Ceiling)
	}
	if pr := s.producerRisk(); pr != nil {
		v := pr(res.c, res.n)
		r.ProducerRisk = &v
	}
	return r
}

func (s sizer) tooLarge(res searchResult) error {
	e := &TooLargeError{Limit: MaxSampleSize, Relax: s.relax(res.consumerOnly)}
	if s.in.Population > 0 && s.in.Population <= MaxSampleSize {
		e.Population = s.in.Population
	}
	return tooLargeError(e)
}

// relax names the inputs that shrink the plan: the consumer's side when even
// the zero-failure plan is out of reach, else the producer's side.
func (s sizer) relax(consumerSide bool) []string {
	if consumerSide || s.in.Anticipated == nil {
		r := []string{"ceiling", "confidence"}
		if s.in.Multiplicity.EffectiveCandidates(s.in.CandidateCount) > 1 {
			r = append(r, "candidates")
		}
		return r
	}
	return []string{"anticipated", "producer-risk"}
}

// fmtNum formats a number for messages and reports: the shortest decimal
// that reads back as the same float64.
func fmtNum(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
