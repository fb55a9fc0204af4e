package agreement

import (
	"errors"
	"fmt"
	"slices"
	"strconv"
	"strings"

	"probity/plan/inputerr"
	"probity/plan/personname"
	"probity/plan/record"
	"probity/sampling/drawfolder"
)

// Input is what Resolve reads: the ledger (which items are doubled), both
// labeled worksheets, the adjudications and the options. The file names
// are used in messages.
type Input struct {
	// Classes are the plan's classes (at least two).
	Classes []string
	// Ledger rows; LedgerRow.Double marks the doubled items.
	Ledger     []drawfolder.LedgerRow
	LedgerFile string
	// First is the labeled worksheet, Second the labeled second worksheet.
	First      []drawfolder.WorksheetRow
	FirstFile  string
	Second     []drawfolder.WorksheetRow
	SecondFile string
	// Adjudications are the rows of the adjudication file; AdjudicationFile
	// is "" when none was given.
	Adjudications    []Adjudication
	AdjudicationFile string
	// Strict refuses (instead of warning about) an item labeled twice by
	// the same person, and a doubled item that does not name both
	// labelers or whose second (or first) label is blank.
	Strict bool
	// AllowUnadjudicated lets disagreements without an adjudication row
	// through; each is then counted as an error for every candidate.
	AllowUnadjudicated bool
	// Confidence is the level of the kappa and AC1 intervals (0 means
	// 0.95).
	Confidence float64
	// Ceiling is the plan's error ceiling, for comparison in the note on
	// label error (0: not compared).
	Ceiling float64
}

// Sources of a final label.
const (
	// FromFirst: the item was not doubled; the first worksheet's label.
	FromFirst = "first"
	// FromAgreement: both labelers gave the same class.
	FromAgreement = "agreed"
	// FromOneSide: one of the two labels was blank; the other one.
	FromOneSide = "one-side"
	// FromAdjudication: the adjudication file's final_label.
	FromAdjudication = "adjudicated"
	// FromNeither: neither labeler gave a class (both blank or unsure)
	// and no adjudication: the label is unsure (or blank when both were).
	FromNeither = "neither"
	// CountedAsError: a disagreement left unadjudicated under
	// AllowUnadjudicated; it counts as an error for every candidate.
	CountedAsError = "counted-as-error"
)

// Final is the label the judgement uses for one item.
type Final struct {
	Item     int
	RecordID string
	// Label is a class, drawfolder.Unsure or "" (blank), in the normal
	// form of drawfolder.ParseLabel. It is "" for an item counted as an
	// error.
	Label string
	// Source says where Label came from (FromFirst, FromAgreement, …).
	Source string
}

// CountsAsError reports whether the item must be counted as an error for
// every candidate, whatever the candidates predicted.
func (f Final) CountsAsError() bool { return f.Source == CountedAsError }

// Result is the outcome of Resolve.
type Result struct {
	// Labels has one entry per row of Input.First, in the same order.
	Labels []Final
	// Quality is the label-quality summary for record.json. Its
	// SecondWorksheet, Adjudications (fingerprints) and UnsureTreatment
	// are left for the caller, who knows the files and the spares.
	Quality record.LabelQuality
}

// Method names written into the record.
const (
	KappaMethod = "Cohen's kappa; large-sample standard error of Fleiss, Cohen & Everitt (1969); normal interval"
	AC1Method   = "Gwet's AC1; variance of Gwet (2008) without finite-population correction; normal interval"
)

// Resolve checks the second worksheet and the adjudications against the
// ledger and the first worksheet, and returns the final label of every
// item with the label-quality summary.
//
// For a doubled item with first label a and second label b:
//   - a and b the same class: agreed; that class.
//   - a and b different classes, or one a class and the other unsure: a
//     disagreement. Its final label is the adjudication's; without one it
//     is refused, or with AllowUnadjudicated counted as an error for every
//     candidate.
//   - one a class and the other blank: that class, not compared, with a
//     warning (refused under Strict), unless an adjudication row decides it.
//   - neither a class: unsure (blank if both are blank), unless an
//     adjudication row decides it.
//
// Only pairs of two classes enter the agreement table, kappa and AC1.
// Errors are *inputerr.Error naming the file, line and column.
func Resolve(in Input) (*Result, error) {
	conf := in.Confidence
	if conf == 0 {
		conf = 0.95
	}
	if err := checkConfidence(conf); err != nil {
		return nil, err
	}
	tb, err := NewTable(in.Classes)
	if err != nil {
		return nil, err
	}
	if in.AdjudicationFile == "" && len(in.Adjudications) > 0 {
		return nil, errors.New("agreement: adjudications given without a file name")
	}
	ledger, doubled, err := indexLedger(in)
	if err != nil {
		return nil, err
	}
	first, err := indexFirst(in, ledger, doubled, tb)
	if err != nil {
		return nil, err
	}
	second, err := indexSecond(in, ledger, doubled, tb)
	if err != nil {
		return nil, err
	}
	adj, err := indexAdjudications(in, ledger)
	if err != nil {
		return nil, err
	}

	q := record.LabelQuality{
		Doubled:            len(doubled),
		Classes:            append([]string(nil), in.Classes...),
		AllowUnadjudicated: in.AllowUnadjudicated,
		Strict:             in.Strict,
		Disagreements:      []record.Disagreement{},
		Warnings:           []string{},
	}
	finals := map[int]Final{}
	var open []int // disagreements without adjudication
	unnamed := 0
	for _, item := range doubled {
		f, s := first[item], second[item]
		if err := checkIndependence(in, f, s, &q, &unnamed); err != nil {
			return nil, err
		}
		a, b := f.Label, s.Label
		ac, bc := tb.Has(a), tb.Has(b)
		fin := Final{Item: item, RecordID: ledger[item].RecordID}
		ad, hasAdj := adj[item]
		switch {
		case ac && bc && a == b:
			if hasAdj {
				return nil, inputerr.At(in.AdjudicationFile, ad.Line, "item",
					"the labelers agreed on item %d (both %q); only disagreements are adjudicated", item, a).WithHint("remove the row")
			}
			fin.Label, fin.Source = a, FromAgreement
		case (ac || bc) && a != "" && b != "":
			if hasAdj {
				fin.Label, fin.Source = ad.FinalLabel, FromAdjudication
				q.Adjudicated++
				q.Disagreements = append(q.Disagreements, adjudicated(fin, f, s, ad))
			} else {
				fin.Source = CountedAsError
				open = append(open, item)
				q.Disagreements = append(q.Disagreements, record.Disagreement{Item: item, RecordID: fin.RecordID,
					First: a, FirstLabeler: f.Labeler, Second: b, SecondLabeler: s.Labeler, Resolution: record.ResolvedCountedAsError})
			}
		case ac || bc:
			// One side blank: the other label stands, uncompared.
			side, blankFile, line := b, in.FirstFile, f.Line
			if ac {
				side, blankFile, line = a, in.SecondFile, s.Line
			}
			switch {
			case hasAdj:
				fin.Label, fin.Source = ad.FinalLabel, FromAdjudication
				q.Adjudicated++
				q.Disagreements = append(q.Disagreements, adjudicated(fin, f, s, ad))
			case in.Strict:
				return nil, inputerr.At(blankFile, line, "label", "item %d has no label, but it was drawn for two independent labels (labeler independence enforced)", item).WithHint("have it labeled, or adjudicate it")
			default:
				fin.Label, fin.Source = side, FromOneSide
				q.Warnings = append(q.Warnings, fmt.Sprintf("%s line %d: item %d has no label here, so it has one label only and is not compared", blankFile, line, item))
			}
		default:
			// Neither gave a class.
			if hasAdj {
				fin.Label, fin.Source = ad.FinalLabel, FromAdjudication
				q.Adjudicated++
				q.Disagreements = append(q.Disagreements, adjudicated(fin, f, s, ad))
			} else {
				fin.Source = FromNeither
				if a == drawfolder.Unsure || b == drawfolder.Unsure {
					fin.Label = drawfolder.Unsure
				}
			}
		}
		if ac && bc {
			if err := tb.Add(a, b); err != nil {
				return nil, err
			}
		}
		finals[item] = fin
	}
	if unnamed > 0 {
		q.Warnings = append(q.Warnings, fmt.Sprintf("%d doubled items do not name both labelers, so the independence of their two labels cannot be checked", unnamed))
	}
	if len(open) > 0 {
		if !in.AllowUnadjudicated {
			return nil, unadjudicatedError(in, open)
		}
		q.Unadjudicated = len(open)
		q.Warnings = append(q.Warnings, fmt.Sprintf("%d disagreements were not adjudicated and count as errors for every candidate (unadjudicated disagreements allowed): items %s", len(open), itemList(open, len(open))))
	}

	fillAgreement(&q, tb, conf)
	fillDisagreement(&q, tb, conf, in.Ceiling)
	q.Labelers = countLabelers(in.First, in.Second, in.Classes)

	res := &Result{Labels: make([]Final, 0, len(in.First))}
	for _, r := range in.First {
		f, ok := finals[r.Item]
		if !ok {
			l, _ := drawfolder.ParseLabel(r.Label, in.Classes)
			f = Final{Item: r.Item, RecordID: r.RecordID, Label: l, Source: FromFirst}
		}
		if f.Label == drawfolder.Unsure {
			q.Unsure++
		}
		res.Labels = append(res.Labels, f)
	}
	res.Quality = q
	return res, nil
}

// adjudicated is the disagreement entry of an item the adjudication file
// resolved.
func adjudicated(fin Final, f, s drawfolder.WorksheetRow, ad Adjudication) record.Disagreement {
	return record.Disagreement{Item: fin.Item, RecordID: fin.RecordID,
		First: f.Label, FirstLabeler: f.Labeler, Second: s.Label, SecondLabeler: s.Labeler,
		Resolution: record.ResolvedAdjudicated, Final: ad.FinalLabel, DecidedBy: ad.DecidedBy, Note: ad.Note}
}

// fillAgreement writes the table and both coefficients into q.
func fillAgreement(q *record.LabelQuality, tb *Table, conf float64) {
	q.Compared = tb.N()
	q.Table = make([][]int, len(tb.Counts))
	for i, row := range tb.Counts {
		q.Table[i] = append([]int{}, row...)
	}
	q.ObservedAgreement = tb.ObservedAgreement()
	conv := func(method string, e Estimate, err error) record.Agreement {
		a := record.Agreement{Method: method, Confidence: conf}
		if err != nil {
			a.Note = undefinedNote(err)
			return a
		}
		a.Defined = true
		a.Value, a.ChanceAgreement, a.StdErr, a.Lower, a.Upper = e.Value, e.Chance, e.StdErr, e.Lower, e.Upper
		if e.StdErr < degenerateSE {
			a.Note = DegenerateNote
		}
		return a
	}
	k, kerr := CohenKappa(tb, conf)
	q.Kappa = conv(KappaMethod, k, kerr)
	a, aerr := GwetAC1(tb, conf)
	q.AC1 = conv(AC1Method, a, aerr)
}

// degenerateSE is the standard error below which an interval is reported
// as degenerate: a variance that is 0 in exact arithmetic comes out of the
// formulas as a rounding residue of about 1e-15, whose root is 3e-8.
const degenerateSE = 1e-6

// DegenerateNote is the note on a coefficient whose large-sample standard
// error is 0 (the labelers agreed on every compared item, or one of them
// used a single class).
const DegenerateNote = "the large-sample standard error is 0 on this table, so the interval has no width and says nothing about sampling error; the disagreement bound does"

// undefinedNote turns an ErrUndefined into the sentence for the record.
func undefinedNote(err error) string {
	msg := err.Error()
	if i := strings.Index(msg, ": "); i >= 0 {
		msg = msg[i+2:]
	}
	return "undefined: " + msg
}

// itemList formats up to max item numbers, then "and N more".
func itemList(items []int, max int) string {
	var b strings.Builder
	for i, it := range items {
		if i == max {
			fmt.Fprintf(&b, " and %d more", len(items)-max)
			break
		}
		if i > 0 {
			b.WriteString(", ")
		}
		b.WriteString(strconv.Itoa(it))
	}
	return b.String()
}

// ErrUnadjudicated is the cause of the refusal of disagreements left
// without an adjudication when Input.AllowUnadjudicated is not set; a
// caller can name its own ways of giving the adjudications or allowing
// them in the hint.
var ErrUnadjudicated = errors.New("disagreements are not adjudicated")

// unadjudicatedError is the refusal for disagreements without a row.
func unadjudicatedError(in Input, open []int) error {
	if in.AdjudicationFile == "" {
		return inputerr.At(in.SecondFile, 0, "", "%d doubled items have two different labels and need an adjudication: items %s", len(open), itemList(open, 10)).
			Wrap(ErrUnadjudicated).WithHint("write one row per item to an adjudication file (columns " + strings.Join(AdjudicationColumns, ",") + ")")
	}
	return inputerr.At(in.AdjudicationFile, 0, "", "no row for %d of the disagreements: items %s", len(open), itemList(open, 10)).
		Wrap(ErrUnadjudicated).WithHint("add one row per item")
}

// sameLabeler compares two labeler names as personname.Same does (NFC,
// trimmed, ignoring case). Empty names are never the same.
func sameLabeler(a, b string) bool {
	return strings.TrimSpace(a) != "" && personname.Same(a, b)
}

// checkIndependence warns (or, under Strict, refuses) when one person gave
// both labels of an item or a doubled item does not name both labelers.
func checkIndependence(in Input, f, s drawfolder.WorksheetRow, q *record.LabelQuality, unnamed *int) error {
	if sameLabeler(f.Labeler, s.Labeler) {
		if in.Strict {
			return inputerr.At(in.SecondFile, s.Line, "labeler", "item %d was labeled by %q in both worksheets; its two labels are not independent (labeler independence enforced)", s.Item, strings.TrimSpace(s.Labeler)).WithHint("have another person give the second label")
		}
		q.Warnings = append(q.Warnings, fmt.Sprintf("%s line %d: item %d was labeled by %q in both worksheets; its two labels are not independent", in.SecondFile, s.Line, s.Item, strings.TrimSpace(s.Labeler)))
		return nil
	}
	if strings.TrimSpace(f.Labeler) == "" || strings.TrimSpace(s.Labeler) == "" {
		if in.Strict {
			file, line := in.SecondFile, s.Line
			if strings.TrimSpace(f.Labeler) == "" {
				file, line = in.FirstFile, f.Line
			}
			return inputerr.At(file, line, "labeler", "item %d does not name its labeler; enforcing labeler independence needs both labelers of every doubled item", s.Item).WithHint("fill in the labeler column")
		}
		*unnamed++
	}
	return nil
}

// countLabelers counts, per labeler name, the rows labeled (a non-blank
// label) in each worksheet. Names equal but for case and surrounding
// space are one labeler, shown with the first spelling in sorted order.
func countLabelers(first, second []drawfolder.WorksheetRow, classes []string) []record.Labeler {
	type acc struct {
		name          string
		first, second int
	}
	by := map[string]*acc{}
	add := func(rows []drawfolder.WorksheetRow, isFirst bool) {
		for _, r := range rows {
			if _, k := drawfolder.ParseLabel(r.Label, classes); k == drawfolder.LabelBlank {
				continue
			}
			name := strings.TrimSpace(r.Labeler)
			key := strings.ToLower(name)
			a, ok := by[key]
			if !ok {
				a = &acc{name: name}
				by[key] = a
			} else if name < a.name {
				a.name = name
			}
			if isFirst {
				a.first++
			} else {
				a.second++
			}
		}
	}
	add(first, true)
	add(second, false)
	keys := make([]string, 0, len(by))
	for k := range by {
		keys = append(keys, k)
	}
	slices.Sort(keys)
	out := make([]record.Labeler, 0, len(keys))
	for _, k := range keys {
		a := by[k]
		out = append(out, record.Labeler{Name: a.name, First: a.first, Second: a.second})
	}
	return out
}
