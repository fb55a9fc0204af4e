package main

import (
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"time"

	"github.com/spf13/cobra"

	chart "probity/pdfreport/trend"
	"probity/plan/inputerr"
	"probity/plan/numfmt"
	"probity/plan/record"
	"probity/plan/record/signature"
	"probity/plan/record/verification"
	"probity/plan/trend"
	"probity/sampling/safewrite"
)

// trendOptions are the flags and arguments of probity trend.
type trendOptions struct {
	paths    []string
	baseline string
	alpha    float64
	chart    string
	json     bool
	// measure and candidate choose what a trend of records with measures
	// charts.
	measure, candidate string
	// pub, signers and allowUnauthenticated say what the records are
	// authenticated against, or that they may be charted without.
	pub                  []string
	signers              string
	allowUnauthenticated bool
}

// trendChartDPI is the resolution of the PNG chart.
const trendChartDPI = 150

// newTrendCommand builds `probity trend`.
func newTrendCommand(d deps) *cobra.Command {
	opts := &trendOptions{}
	cmd := &cobra.Command{
		Use:   "trend RECORD.json|FOLDER...",
		Short: "Show the audits of several periods side by side and flag drift",
		Long: `trend reads the record.json of every period's audit — files, or folders searched
for record.json and other *.json files that are records — and prints, per
candidate, the period, labeled, errors, estimate, upper bound, ceiling and
verdict, in period order.

A period whose error is significantly higher than the baseline period's (the
first period, or --baseline) is flagged, even while it still passes: Fisher's
exact test, one-sided, on the error counts of the two periods, at level
--alpha for each comparison (not adjusted for the number of periods).

Records must be of one class of plan: the same model (binomial stream,
hypergeometric lot, or a distribution-free bound), method, design (fixed or
sequential), ceiling and confidence. A mix is refused. Records made from
different plan files, or with different candidates, are compared with a
warning. Each period may appear once, and period labels must be written the
same way (2026-09, not 2026-9) so that sorting them gives time order.

Every record is authenticated before it is charted, with the same trust
inputs as probity verify: its record id must recompute from its content,
and the operator's seal (record.sig beside it) and the people's signatures
(signatures.txt) must be valid and made with keys --pub or --signers vouch
for; a record with no signature, or an edited one, is refused (exit 1, and
nothing is charted). --allow-unauthenticated charts records that cannot be
authenticated (with or without trust inputs) and says so: a note per
record, the "unauthenticated" list of --json, and a red line on the chart.

--chart PREFIX writes PREFIX.png (the chart: one panel per candidate, the
estimate and upper bound of every period against the ceiling) and PREFIX.pdf
(one page: the chart above a table of every period).

Records with measures (plans made with --measure) chart one measure's claim
per period instead: its counted items and events, the weighted estimate, the
one-sided upper bound and the claim's ceiling, for --measure (default: the
first measure claimed) and --candidate (default: the candidate the latest
record released, else every candidate), with the released candidate of each
period. Their periods are not compared with a baseline (the estimates are
weighted over strata sampled at different rates).

` + exitHelp("the latest period's record does not reject, and every record is authenticated",
			"the latest period's record rejects (overall verdict REJECT), or a record cannot be\nauthenticated (without --allow-unauthenticated)", true),
		Args: func(cmd *cobra.Command, args []string) error {
			if len(args) == 0 {
				return inputerr.Errorf("trend needs at least one record.json or folder of records").WithHint("e.g. 'probity trend audits/' or 'probity trend audits/2026-*/record.json'")
			}
			return nil
		},
		PreRunE: func(cmd *cobra.Command, args []string) error {
			opts.paths = args
			return opts.validate()
		},
		RunE: func(cmd *cobra.Command, args []string) error {
			return runTrend(d, opts)
		},
	}
	fl := cmd.Flags()
	fl.StringVar(&opts.baseline, "baseline", "", "the `PERIOD` every other period is compared with (default: the first)")
	fl.Float64Var(&opts.alpha, "alpha", 0.05, "significance `LEVEL` of each one-sided comparison with the baseline, in (0, 0.5]")
	fl.StringVar(&opts.measure, "measure", "", "for records with measures: the `NAME` charted, error, fnr, fpr, for or fdr (default: the first claimed)")
	fl.StringVar(&opts.candidate, "candidate", "", "for records with measures: the candidate `NAME` charted (default: the latest record's released one, else all)")
	fl.StringVar(&opts.chart, "chart", "", "write the chart to `PREFIX`.png and a one-page PREFIX.pdf")
	fl.BoolVar(&opts.json, "json", false, "print one JSON object (stable keys) instead of the tables")
	fl.StringArrayVar(&opts.pub, "pub", nil, "a public `KEY.pub` trusted to seal records; repeatable")
	fl.StringVar(&opts.signers, "signers", "", "the signers `FILE`: whose key signs in which role")
	fl.BoolVar(&opts.allowUnauthenticated, "allow-unauthenticated", false, "chart records that cannot be authenticated, marked as such")
	return cmd
}

// validate checks the flags before any file is read.
func (o *trendOptions) validate() error {
	if !(o.alpha > 0 && o.alpha <= 0.5) {
		return inputerr.Errorf("--alpha %v is outside (0, 0.5]", o.alpha).WithHint("the usual level is 0.05")
	}
	if len(o.pub) == 0 && o.signers == "" && !o.allowUnauthenticated {
		return inputerr.Errorf("trend authenticates every record it charts, and no trusted key or signers file was given").
			WithHint("pass --pub KEY.pub (the operator's seal) or --signers FILE, or --allow-unauthenticated to chart records that cannot be authenticated, marked as such")
	}
	if o.chart != "" {
		ext := strings.ToLower(filepath.Ext(o.chart))
		if ext == ".png" || ext == ".pdf" {
			return inputerr.Errorf("--chart %s: give a prefix, not a file name", o.chart).WithHint("--chart " + strings.TrimSuffix(o.chart, filepath.Ext(o.chart)) + " writes both the .png and the .pdf")
		}
		if strings.HasSuffix(o.chart, string(filepath.Separator)) {
			return inputerr.Errorf("--chart %s: give a prefix, not a folder", o.chart).WithHint("e.g. --chart " + filepath.Join(o.chart, "trend"))
		}
	}
	return nil
}

// trendReport is the --json output: the trend with the tool version, the
// chart files written and the JSON files skipped under the folders.
type trendReport struct {
	Format      int    `json:"format"`
	ToolVersion string `json:"tool_version"`
	*trend.Trend
	Chart   *trendChartFiles `json:"chart"`
	Skipped []string         `json:"skipped"`
}

// trendChartFiles names the chart files written.
type trendChartFiles struct {
	PNG string `json:"png"`
	PDF string `json:"pdf"`
}

// trendReportFormat is the version of the --json layout.
const trendReportFormat = 1

func runTrend(d deps, o *trendOptions) error {
	loaded, err := trend.Load(o.paths)
	if err != nil {
		return trendInputError(err)
	}
	if err := authenticateTrend(d, o, loaded); err != nil {
		return err
	}
	t, err := trend.Build(loaded.Entries, trend.Options{Baseline: o.baseline, Alpha: o.alpha, Measure: o.measure, Candidate: o.candidate})
	if err != nil {
		return trendInputError(flagNames(err, map[string]string{"measure": "--measure", "candidate": "--candidate"}))
	}
	if len(loaded.Skipped) > 0 {
		what := "JSON files that are not records"
		if len(loaded.Skipped) == 1 {
			what = "JSON file that is not a record"
		}
		fmt.Fprintf(d.stderr, "probity: note: skipped %d %s (%s)\n", len(loaded.Skipped), what, trendShortList(loaded.Skipped, 1))
	}
	for _, w := range t.Warnings {
		fmt.Fprintf(d.stderr, "probity: warning: %s\n", w)
	}
	var files *trendChartFiles
	if o.chart != "" {
		files, err = writeTrendChart(t, o.chart, loaded, d)
		if err != nil {
			return err
		}
	}
	if o.json {
		rep := trendReport{Format: trendReportFormat, ToolVersion: d.version, Trend: t, Chart: files, Skipped: loaded.Skipped}
		if rep.Skipped == nil {
			rep.Skipped = []string{}
		}
		enc := json.NewEncoder(d.stdout)
		enc.SetEscapeHTML(false)
		enc.SetIndent("", "  ")
		if err := enc.Encode(rep); err != nil {
			return &internalError{msg: "encoding the trend: " + err.Error()}
		}
	} else {
		printTrend(d.stdout, t, files)
	}
	if t.Latest.OverallVerdict == record.Reject {
		return rejected("latest period %s was rejected (record %s, %s)", t.Latest.Label, t.Latest.RecordID, t.Latest.File)
	}
	return nil
}

// authenticateTrend authenticates every record loaded: a record that does
// not authenticate is refused (exit 1) unless unauthenticated records are
// allowed, when it is marked and noted on stderr.
func authenticateTrend(d deps, o *trendOptions, loaded *trend.Loaded) error {
	trust, err := loadTrust(d, o.pub, o.signers)
	if err != nil {
		return err
	}
	refused := 0
	for i := range loaded.Entries {
		e := &loaded.Entries[i]
		rep, err := verification.Authenticate(e.Path, trust, verifyNames)
		if err != nil {
			return err
		}
		failed := rep.Failed()
		if len(failed) == 0 {
			continue
		}
		e.Unauthenticated = true
		if o.allowUnauthenticated {
			fmt.Fprintf(d.stderr, "probity: note: %s is charted unauthenticated: %s\n", e.Path, failed[0].Detail)
			continue
		}
		refused++
		for _, c := range failed {
			fmt.Fprintf(d.stderr, "probity: %s: not authenticated: %s\n", e.Path, c.Detail)
		}
	}
	if refused > 0 {
		return rejected("%d of %d records could not be authenticated; nothing was charted (--allow-unauthenticated charts them, marked as such)", refused, len(loaded.Entries))
	}
	return nil
}

// trendInputError adds the flag that fixes a record without a period.
func trendInputError(err error) error {
	if errors.Is(err, trend.ErrNoPeriod) {
		return inputerr.SetHint(err, "draw each month's sample with 'probity draw --period LABEL' (e.g. 2026-11) and record it again")
	}
	return err
}

// writeTrendChart renders the PNG and the PDF and writes both through
// safewrite, together: a failure leaves neither, a missing folder is
// created, and neither may replace a file of a record (the records read,
// or a record folder the prefix points into).
func writeTrendChart(t *trend.Trend, prefix string, loaded *trend.Loaded, d deps) (*trendChartFiles, error) {
	w, h := chart.ChartSize(t)
	pngData, err := chart.PNG(t, w, h, trendChartDPI)
	if err != nil {
		return nil, err
	}
	date, err := time.Parse("2006-01-02", t.Latest.Date)
	if err != nil {
		return nil, &internalError{msg: "the latest record's date was not validated: " + err.Error()}
	}
	pdfData, err := chart.PDF(t, chart.PageInfo{Date: date, ToolVersion: d.version})
	if err != nil {
		return nil, inputerr.SetHint(err, "the PNG chart has no size limit; make the PDF from fewer records")
	}
	files := &trendChartFiles{PNG: prefix + ".png", PDF: prefix + ".pdf"}
	err = safewrite.Write([]safewrite.File{{Path: files.PNG, Data: pngData}, {Path: files.PDF, Data: pdfData}},
		safewrite.Options{Replace: true, Protected: trendProtected(loaded, filepath.Dir(prefix))})
	if errors.Is(err, safewrite.ErrProtected) {
		return nil, inputerr.SetHint(err, "--chart names a record's own file; give a prefix outside the record folders, e.g. --chart audits/trend")
	}
	if err != nil {
		return nil, err
	}
	return files, nil
}

// trendProtected are the files a chart must never replace: every record
// read, the record.pdf and record.sig beside each record.json, and the
// files of a record folder the chart's folder is.
func trendProtected(loaded *trend.Loaded, chartDir string) []string {
	var out []string
	recordFolder := func(dir string) {
		for _, name := range []string{record.JSONFile, record.PDFFile, signature.FileName, signature.SignaturesFile} {
			out = append(out, filepath.Join(dir, name))
		}
	}
	for _, e := range loaded.Entries {
		out = append(out, e.Path)
		if filepath.Base(e.Path) == record.JSONFile {
			recordFolder(filepath.Dir(e.Path))
		}
	}
	if _, err := os.Stat(filepath.Join(chartDir, record.JSONFile)); err == nil {
		recordFolder(chartDir)
	}
	return out
}

// trendShortList joins up to n items, then "and k more".
func trendShortList(xs []string, n int) string {
	if len(xs) <= n {
		return strings.Join(xs, ", ")
	}
	return fmt.Sprintf("%s and %d more", strings.Join(xs[:n], ", "), len(xs)-n)
}

// printTrend writes the human-readable trend: a heading, one table per
// candidate and the latest verdict.
// printTrendHead writes the first lines of every trend: the records, their
// period, the system and which records are charted unauthenticated.
func printTrendHead(w io.Writer, t *trend.Trend) {
	head := fmt.Sprintf("Trend of %s, %s to %s", countOf(len(t.Periods), "record", "records"), t.Periods[0].Label, t.Latest.Label)
	if sys := strings.TrimSpace(t.System + " " + t.SystemVersion); sys != "" {
		head += " — " + sys
	}
	fmt.Fprintln(w, head)
	if len(t.Unauthenticated) > 0 {
		fmt.Fprintf(w, "UNAUTHENTICATED records charted: %s (their signatures did not authenticate them, or were not checked)\n", strings.Join(t.Unauthenticated, ", "))
	}
}

func printTrend(w io.Writer, t *trend.Trend, files *trendChartFiles) {
	if t.Measure != nil {
		printMeasureTrend(w, t, files)
		return
	}
	c := t.Class
	printTrendHead(w, t)
	fmt.Fprintf(w, "plan: %s model, %s method, %s design; ceiling %s, confidence %s\n",
		c.Model, c.Method, c.Design, numfmt.Setting(c.Ceiling), numfmt.Confidence(c.Confidence))
	fmt.Fprintf(w, "flag ↑: one-sided Fisher's exact test against %s, p ≤ %s per comparison\n",
		t.Baseline, numfmt.Number(t.Alpha))
	pw := len("period")
	for _, p := range t.Periods {
		pw = max(pw, len(p.Label))
	}
	for _, s := range t.Candidates {
		fmt.Fprintln(w)
		switch {
		case !s.Tested:
			fmt.Fprintf(w, "%s   (not in the baseline period: not tested)\n", s.Name)
		case len(s.Flagged) > 0:
			fmt.Fprintf(w, "%s   flagged: %s\n", s.Name, strings.Join(s.Flagged, ", "))
		default:
			fmt.Fprintln(w, s.Name)
		}
		fmt.Fprintf(w, "  %-*s  %7s %6s %9s %9s %7s  %-7s %s\n", pw, "period", "labeled", "errors", "estimate", "upper", "ceiling", "verdict", "p vs "+t.Baseline)
		for _, r := range s.Rows {
			p := "(baseline)"
			if r.PValue != nil {
				p = numfmt.PValue(*r.PValue)
				if r.Flagged {
					p += " ↑ higher"
				}
			} else if r.Period != t.Baseline {
				p = "—"
			}
			fmt.Fprintf(w, "  %-*s  %7s %6s %9s %9s %7s  %-7s %s\n", pw, r.Period, numfmt.Count(r.Labeled), numfmt.Count(r.Errors),
				numfmt.Rate(r.Estimate), numfmt.RateUp(r.UpperBound), numfmt.Setting(r.Ceiling), r.Verdict, p)
		}
	}
	fmt.Fprintln(w)
	fmt.Fprintf(w, "latest period %s (record %s): %s\n", t.Latest.Label, t.Latest.RecordID, t.Latest.OverallVerdict)
	if files != nil {
		fmt.Fprintf(w, "chart: %s, %s\n", files.PNG, files.PDF)
	}
}
