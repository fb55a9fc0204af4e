package plan

// Model is the probability model behind a plan's risks (Rule.Model). It is
// written in plan.yaml and record.json by its name ("binomial",
// "hypergeometric", "hoeffding", "kl"); the zero value is unset (written
// as ""), which a judgement takes as binomial.
type Model int

// Probability models.
const (
	// ModelUnset: the plan file does not say; judged as ModelBinomial.
	ModelUnset Model = iota
	// ModelBinomial: an unbounded stream of decisions, errors X ~ Bin(n, p).
	ModelBinomial
	// ModelHypergeometric: a finite lot of N decisions sampled without
	// replacement.
	ModelHypergeometric
	// ModelHoeffding: Hoeffding's inequality, distribution-free.
	ModelHoeffding
	// ModelKL: the Chernoff bound in relative-entropy form,
	// distribution-free.
	ModelKL
)

var modelSpelling = spelling[Model]{field: "model",
	names: []string{"", "binomial", "hypergeometric", "hoeffding", "kl"}}

// ParseModel returns the model named s, or an input error (inputerr.Error) on the field
// "model".
func ParseModel(s string) (Model, error) { return modelSpelling.parse(s) }

// String is the name as written in plan.yaml ("" when unset).
func (m Model) String() string { return modelSpelling.name(m) }

// MarshalText writes the name (plan.yaml, record.json).
func (m Model) MarshalText() ([]byte, error) { return modelSpelling.marshal(m) }

// UnmarshalText reads a name; the empty string is ModelUnset.
func (m *Model) UnmarshalText(b []byte) error { return modelSpelling.unmarshal(b, m) }

// Title names the model in a report ("binomial model (unbounded
// stream)", …); "" when unset.
func (m Model) Title() string {
	switch m {
	case ModelBinomial:
		return "binomial model (unbounded stream)"
	case ModelHypergeometric:
		return "hypergeometric model (finite lot)"
	case ModelHoeffding:
		return "Hoeffding inequality"
	case ModelKL:
		return "Chernoff bound (Kullback–Leibler form)"
	}
	return m.String()
}

// Model is the probability model behind this method's risks: the
// distribution-free methods are their own model; the exact test (and an
// unset method) is hypergeometric for a lot of population decisions and
// binomial for an unbounded stream (population 0).
func (m Method) Model(population int64) Model {
	switch {
	case m == MethodHoeffding:
		return ModelHoeffding
	case m == MethodKL:
		return ModelKL
	case population > 0:
		return ModelHypergeometric
	}
	return ModelBinomial
}
