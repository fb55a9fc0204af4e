package record

// LabelQuality is the evidence on the reference labels of a record with
// double labeling (`probity draw --double k`, `probity record --second`):
// who labeled, how far two independent labels agreed on the doubled items,
// every disagreement and how it was resolved, and the unsure items. It is
// filled by package plan/agreement and shown in the PDF's "Label quality"
// section.
type LabelQuality struct {
	// SecondWorksheet and Adjudications are the SHA-256 of the labeled
	// second worksheet and of the adjudication file ("" when none).
	SecondWorksheet string `json:"second_worksheet_sha256"`
	Adjudications   string `json:"adjudications_sha256"`
	// Doubled is the number of items the draw marked for a second label.
	// Compared is how many of them both labelers put in a class (neither
	// blank nor unsure): the items the agreement table and coefficients
	// are computed on.
	Doubled  int `json:"doubled"`
	Compared int `json:"compared"`
	// Classes and Table are the agreement table: Table[i][j] counts the
	// compared items the first labeler put in Classes[i] and the second in
	// Classes[j].
	Classes []string `json:"classes"`
	Table   [][]int  `json:"table"`
	// ObservedAgreement is the share of compared items on the diagonal.
	ObservedAgreement float64 `json:"observed_agreement"`
	// Kappa is Cohen's kappa, AC1 Gwet's AC1, each with its chance
	// agreement, standard error and interval.
	Kappa Agreement `json:"kappa"`
	AC1   Agreement `json:"ac1"`
	// Labelers lists every labeler name found in the worksheets, sorted,
	// with how many rows each labeled.
	Labelers []Labeler `json:"labelers"`
	// Disagreements lists, in item order, every doubled item whose two
	// labels differ while at least one is a class and neither is blank,
	// and every other doubled item the adjudication file decided, each
	// with its resolution.
	Disagreements []Disagreement `json:"disagreements"`
	// Adjudicated counts the disagreements resolved by the adjudication
	// file (plus doubled items both labelers left unsure that it resolved);
	// Unadjudicated those left open, each counted as an error for every
	// candidate (only allowed with AllowUnadjudicated).
	Adjudicated        int  `json:"adjudicated"`
	Unadjudicated      int  `json:"unadjudicated"`
	AllowUnadjudicated bool `json:"allow_unadjudicated"`
	// Strict is set when a labeler named on both labels of an item, or a
	// doubled item without both labeler names, was refused rather than
	// warned about.
	Strict bool `json:"strict"`
	// Disagreed is the number of compared items given two different
	// classes; DisagreementRate = Disagreed/Compared and DisagreementUpper
	// its one-sided Clopper–Pearson upper bound at Kappa.Confidence (both 0
	// when nothing was compared).
	Disagreed         int     `json:"disagreed"`
	DisagreementRate  float64 `json:"disagreement_rate"`
	DisagreementUpper float64 `json:"disagreement_upper"`
	// Note says in plain words what label error does to the bound, with
	// this record's numbers.
	Note string `json:"note"`
	// Unsure is the number of items whose final label is "unsure", and
	// UnsureTreatment says in words what the judgement did with them.
	Unsure          int    `json:"unsure"`
	UnsureTreatment string `json:"unsure_treatment"`
	// Warnings are the label-quality warnings, one sentence each.
	Warnings []string `json:"warnings"`
}

// Agreement is one agreement coefficient. When Defined is false (no
// compared items, or kappa's chance agreement is 1) the numbers are 0 and
// Note says why.
type Agreement struct {
	// Method names the coefficient and its variance.
	Method          string  `json:"method"`
	Defined         bool    `json:"defined"`
	Value           float64 `json:"value"`
	ChanceAgreement float64 `json:"chance_agreement"`
	StdErr          float64 `json:"std_err"`
	// Lower and Upper are the two-sided interval at Confidence, clipped
	// to [−1, 1].
	Lower      float64 `json:"lower"`
	Upper      float64 `json:"upper"`
	Confidence float64 `json:"confidence"`
	Note       string  `json:"note"`
}

// Labeler is one person's share of the labeling. Name is as written in the
// worksheets' labeler column ("" when the column was left blank).
type Labeler struct {
	Name string `json:"name"`
	// First and Second count the rows this labeler gave a label (a class
	// or unsure) in the first and in the second worksheet.
	First  int `json:"first"`
	Second int `json:"second"`
}

// Resolutions of a disagreement.
const (
	// ResolvedAdjudicated: the adjudication file gave the final label.
	ResolvedAdjudicated = "adjudicated"
	// ResolvedCountedAsError: left open under --allow-unadjudicated and
	// counted as an error for every candidate.
	ResolvedCountedAsError = "counted-as-error"
)

// Disagreement is one doubled item the two labelers did not agree on.
type Disagreement struct {
	Item          int    `json:"item"`
	RecordID      string `json:"record_id"`
	First         string `json:"first"`
	FirstLabeler  string `json:"first_labeler"`
	Second        string `json:"second"`
	SecondLabeler string `json:"second_labeler"`
	// Resolution is ResolvedAdjudicated or ResolvedCountedAsError.
	Resolution string `json:"resolution"`
	// Final, DecidedBy and Note come from the adjudication file ("" when
	// unadjudicated).
	Final     string `json:"final"`
	DecidedBy string `json:"decided_by"`
	Note      string `json:"note"`
}
