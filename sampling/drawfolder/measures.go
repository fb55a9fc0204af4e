package drawfolder

// MeasuresInfo is, for a plan with measures, how each claim is judged on
// the draw's strata, fixed before any label: the manifest's record of the
// design the draw sized on the log (plan/measure.NewPeriodDesign).
type MeasuresInfo struct {
	// Positive is the plan's positive (critical) class.
	Positive string `json:"positive"`
	// Flagged[h] lists, per stratum in manifest order, whether each
	// candidate (in plan order) predicts the positive class there.
	Flagged [][]bool `json:"flagged"`
	// Claims are the claims' designs in the plan's order.
	Claims []MeasureClaimInfo `json:"claims"`
	// Uniform is the labels a proportional sample would need for the
	// claims the design is sized for.
	Uniform int `json:"uniform"`
	// Level is α, each claim's share of the family's risk δ.
	Level float64 `json:"level"`
	// Departure, when set, is the cell of the log whose share of the
	// decisions departs most from the share the plan assumed (by more
	// than a quarter): the plan's design was sized for other shares.
	Departure *MeasuresDeparture `json:"departure,omitempty"`
}

// MeasuresDeparture is a cell of the log (a score band, a pattern of
// predictions) whose share of the decisions is not what the plan assumed.
type MeasuresDeparture struct {
	Cell      string  `json:"cell"`
	LogShare  float64 `json:"log_share"`
	PlanShare float64 `json:"plan_share"`
}

// MeasureClaimInfo is one claim's design.
type MeasureClaimInfo struct {
	Candidate string  `json:"candidate"`
	Measure   string  `json:"measure"`
	Ceiling   float64 `json:"ceiling"`
	// Counted[h] is the labeled items of stratum h the claim counts (the
	// first in key order).
	Counted []int `json:"counted"`
	// Floor and BAccept are a ratio's b₀ and c_B (0 for a proportion).
	Floor   int64 `json:"floor"`
	BAccept int   `json:"b_accept"`
	// ProducerRisk is the claim's exact chance of rejection at the
	// composition the plan anticipates, on these strata with these counted
	// items.
	ProducerRisk float64 `json:"producer_risk"`
	// Planned is false when the period's anticipated composition puts the
	// claim at or above its ceiling, or no design meets it alone: the
	// design is not sized for its producer's risk.
	Planned bool `json:"planned"`
}
