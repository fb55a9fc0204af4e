package main

import (
	"fmt"
	"strings"

	"github.com/spf13/cobra"

	"probity/plan/agreement"
	"probity/plan/inputerr"
	"probity/plan/record"
)

// labelQualityOptions are the flags of `probity record` for double
// labeling: the labeled second worksheet, the adjudications, and how to
// treat open disagreements and labelers who labeled both copies.
type labelQualityOptions struct {
	second             string
	adjudicated        string
	allowUnadjudicated bool
	strict             bool
}

// addLabelQualityFlags registers the double-labeling flags on cmd and
// adds their explanation to its help.
func addLabelQualityFlags(cmd *cobra.Command, o *labelQualityOptions) {
	fs := cmd.Flags()
	fs.StringVar(&o.second, "second", "", "the labeled second worksheet `FILE` (worksheet-second.csv of a draw with --double): agreement, Cohen's kappa and Gwet's AC1 on the doubled items")
	fs.StringVar(&o.adjudicated, "adjudicated", "", "adjudication CSV `FILE` ("+strings.Join(agreement.AdjudicationColumns, ",")+"): the final label of each doubled item the two labelers did not agree on")
	fs.BoolVar(&o.allowUnadjudicated, "allow-unadjudicated", false, "issue the record with disagreements left without an adjudication, counting each as an error for every candidate")
	fs.BoolVar(&o.strict, "strict", false, "refuse (instead of warning about) an item labeled twice by the same person, a doubled item that does not name both labelers, or one with a blank label")
	cmd.Long += labelQualityHelp
}

// labelQualityHelp is the part of record's help on double labeling.
const labelQualityHelp = `

Double labeling (a draw made with --double k): pass the labeled
worksheet-second.csv with --second. The record then shows, on the doubled
items, the agreement table, the observed agreement, Cohen's kappa and Gwet's
AC1 with 95 % intervals, the labelers and how many rows each labeled, and
every disagreement with its resolution. Each doubled item the two labelers
did not agree on (two different classes, or a class and unsure) needs a row
in the --adjudicated file, a CSV with the header

  item,record_id,final_label,decided_by,note

(final_label one of the plan's classes, decided_by not blank, note free);
the judgement uses that label. Without a row the record is refused, unless
--allow-unadjudicated, which counts each open disagreement as an error for
every candidate. The same person giving both labels of an item is a warning,
an error with --strict.`

// validate checks the flags that only make sense with --second (or a
// label trail, which may hold the second labels).
func (o labelQualityOptions) validate(trail bool) error {
	if o.second != "" || trail {
		return nil
	}
	var given []string
	if o.adjudicated != "" {
		given = append(given, "--adjudicated")
	}
	if o.allowUnadjudicated {
		given = append(given, "--allow-unadjudicated")
	}
	if o.strict {
		given = append(given, "--strict")
	}
	if len(given) == 0 {
		return nil
	}
	return inputerr.Errorf("%s only apply to double labeling, which needs --second FILE", strings.Join(given, " and ")).WithHint("pass the labeled worksheet-second.csv with --second")
}

// reportLabelQuality prints the label-quality line of a record to stdout
// (when summary is set: not with --json) and its warnings to stderr;
// nothing without double labeling.
func reportLabelQuality(d deps, q *record.LabelQuality, summary bool) {
	if q == nil {
		return
	}
	for _, w := range q.Warnings {
		fmt.Fprintf(d.stderr, "probity: warning: %s\n", w)
	}
	if !summary {
		return
	}
	coef := func(a record.Agreement) string {
		if !a.Defined {
			return "undefined"
		}
		return fmt.Sprintf("%.3f [%.3f, %.3f]", a.Value, a.Lower, a.Upper)
	}
	fmt.Fprintf(d.stdout, "label quality: %d doubled, %d compared, agreement %.4f, kappa %s, AC1 %s; %d disagreements (%d adjudicated, %d counted as errors)\n",
		q.Doubled, q.Compared, q.ObservedAgreement, coef(q.Kappa), coef(q.AC1), len(q.Disagreements), q.Adjudicated, q.Unadjudicated)
}
