package plan

// Method is a plan's decision rule: how the count of errors in the sample
// decides. It is written in plan.yaml and record.json by its name
// ("exact", "hoeffding", "kl"); the zero value is unset (written as "").
type Method int

// Decision rules (Inputs.Method).
const (
	// MethodUnset: the plan file does not say.
	MethodUnset Method = iota
	// MethodExact accepts at ≤ c errors where c keeps the exact binomial
	// (or, for a lot, hypergeometric) consumer's risk.
	MethodExact
	// MethodHoeffding accepts when estimate + sqrt(ln(M'/δ)/(2n)) ≤ ceiling.
	MethodHoeffding
	// MethodKL accepts when the Chernoff relative-entropy bound excludes
	// the ceiling.
	MethodKL
)

var methodSpelling = spelling[Method]{field: "method", names: []string{"", "exact", "hoeffding", "kl"}}

// Methods lists the decision rules a plan may name.
func Methods() []Method { return methodSpelling.values() }

// ParseMethod returns the rule named s ("exact", "hoeffding" or "kl"), or
// an input error (inputerr.Error) on the field "method".
func ParseMethod(s string) (Method, error) { return methodSpelling.parse(s) }

// String is the name as written in plan.yaml ("" when unset).
func (m Method) String() string { return methodSpelling.name(m) }

// MarshalText writes the name (plan.yaml, record.json).
func (m Method) MarshalText() ([]byte, error) { return methodSpelling.marshal(m) }

// UnmarshalText reads a name; the empty string is MethodUnset.
func (m *Method) UnmarshalText(b []byte) error { return methodSpelling.unmarshal(b, m) }

// Title names the rule in a report: "exact test", "Hoeffding bound
// (distribution-free)", "Chernoff bound, Kullback–Leibler form
// (distribution-free)"; "" when unset.
func (m Method) Title() string {
	switch m {
	case MethodExact:
		return "exact test"
	case MethodHoeffding:
		return "Hoeffding bound (distribution-free)"
	case MethodKL:
		return "Chernoff bound, Kullback–Leibler form (distribution-free)"
	}
	return m.String()
}

// ComparisonRule is the row of a plan's comparison (RuleSize.Rule) that
// sizes this method: the exact rule (unset counts as exact) is
// hypergeometric for a lot of population decisions and binomial for an
// unbounded stream (population 0).
func (m Method) ComparisonRule(population int64) string {
	switch m {
	case MethodHoeffding:
		return RuleHoeffding
	case MethodKL:
		return RuleKL
	}
	if population > 0 {
		return RuleExactHypergeometric
	}
	return RuleExactBinomial
}
