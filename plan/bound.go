package plan

// Bound names the upper confidence bound (and the test it inverts) by
// which a judgement decided, as record.json's method.bound writes it
// ("clopper-pearson", "korn-graubard (approximate)", …). The zero value is
// unset (written as "").
type Bound int

// Bounds of a judgement.
const (
	// BoundUnset: the record does not say.
	BoundUnset Bound = iota
	// BoundClopperPearson: the exact binomial bound (ClopperPearsonUpper)
	// on a self-weighting sample of an unbounded stream.
	BoundClopperPearson
	// BoundExactHypergeometric: the exact bound for a finite lot
	// (HypergeometricUpper).
	BoundExactHypergeometric
	// BoundHoeffding: Hoeffding's inequality on a self-weighting sample.
	BoundHoeffding
	// BoundChernoff: the Chernoff relative-entropy (KL) bound on a
	// self-weighting sample.
	BoundChernoff
	// BoundKornGraubard: Clopper–Pearson with the effective sample size on
	// the stratified estimate; approximate. Records made before the
	// stratified count rule rested their verdicts on it; it is read from
	// them but no longer decides (verdict reports it as a descriptive
	// figure).
	BoundKornGraubard
	// BoundWeightedHoeffding: Hoeffding's inequality on the stratified
	// estimate. Read from older records only: the stratified count rule
	// needs fewer labels in every design measured.
	BoundWeightedHoeffding
	// BoundSequential: a sequential plan of an unbounded stream, judged by
	// its boundaries; the bound is exact for the stopping rule.
	BoundSequential
	// BoundSequentialLot: a sequential plan of a finite lot, judged by its
	// boundaries; the bound is descriptive only.
	BoundSequentialLot
	// BoundStratifiedCount: the stratified count rule (plan/stratified): the
	// errors among the counted items against a binomial bound at the least
	// favourable spread of errors over the strata; rigorous for any
	// allocation.
	BoundStratifiedCount
)

var boundSpelling = spelling[Bound]{field: "bound", names: []string{"",
	"clopper-pearson", "exact-hypergeometric", "hoeffding", "kl",
	"korn-graubard (approximate)", "weighted-hoeffding",
	"sequential boundaries (stage-wise exact bound)", "sequential boundaries (bound descriptive)",
	"stratified-count"}}

// ParseBound returns the bound named s as record.json writes it, or an
// input error (inputerr.Error) on the field "bound".
func ParseBound(s string) (Bound, error) { return boundSpelling.parse(s) }

// String is the name as written in record.json ("" when unset).
func (b Bound) String() string { return boundSpelling.name(b) }

// MarshalText writes the name (record.json).
func (b Bound) MarshalText() ([]byte, error) { return boundSpelling.marshal(b) }

// UnmarshalText reads a name; the empty string is BoundUnset.
func (b *Bound) UnmarshalText(text []byte) error { return boundSpelling.unmarshal(text, b) }

// Title names the bound in a report ("Clopper–Pearson (exact binomial)",
// "Korn–Graubard", …); a sequential judgement by its record name, and ""
// when unset.
func (b Bound) Title() string {
	switch b {
	case BoundClopperPearson:
		return "Clopper–Pearson (exact binomial)"
	case BoundExactHypergeometric:
		return "exact hypergeometric"
	case BoundHoeffding:
		return "Hoeffding"
	case BoundChernoff:
		return "Chernoff (Kullback–Leibler)"
	case BoundKornGraubard:
		return "Korn–Graubard"
	case BoundWeightedHoeffding:
		return "weighted Hoeffding"
	case BoundStratifiedCount:
		return "stratified count rule"
	}
	return b.String()
}

// Weighted reports whether the bound is taken on the stratified estimate,
// each stratum weighted by its share N_h/N (the bounds for a sample whose
// inclusion weights differ).
func (b Bound) Weighted() bool {
	return b == BoundKornGraubard || b == BoundWeightedHoeffding || b == BoundStratifiedCount
}

// Exact reports whether the bound inverts a test whose p-value decides
// (Clopper–Pearson, the exact hypergeometric bound and the stratified
// count rule).
func (b Bound) Exact() bool {
	return b == BoundClopperPearson || b == BoundExactHypergeometric || b == BoundStratifiedCount
}

// Approximate reports whether the bound's coverage is only approximately
// the stated confidence (Korn–Graubard; a sequential lot's descriptive
// bound).
func (b Bound) Approximate() bool { return b == BoundKornGraubard || b == BoundSequentialLot }
