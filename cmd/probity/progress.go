package main

import (
	"encoding/json"
	"fmt"
	"io"
	"strings"
	"text/tabwriter"

	"github.com/spf13/cobra"

	"probity/plan"
	"probity/plan/inputerr"
	"probity/plan/planfile"
	"probity/plan/progress"
	"probity/plan/record"
	"probity/plan/sequential"
	"probity/sampling/drawfolder"
)

// labelCellHelp says what a label cell may hold, in the help of every
// command that reads labels (the rule is drawfolder.ParseLabel's).
const labelCellHelp = `A label cell holds one of the plan's classes, spelled exactly as the plan
spells it (case counts: "OK" is not the class "ok"), the word "unsure" in any
case ("Unsure" too) for an item that cannot be decided, or nothing; spaces
around it are ignored. Anything else is refused, naming the file and line.`

// progressOptions are the flags of probity progress.
type progressOptions struct {
	planPath string
	drawDir  string
	labels   string
	json     bool
}

// newProgressCommand builds `probity progress`.
func newProgressCommand(d deps) *cobra.Command {
	opts := &progressOptions{}
	cmd := &cobra.Command{
		Use:   "progress --plan PLAN.yaml --draw DIR --labels PARTIAL.csv",
		Short: "Say whether labeling can stop early, from a worksheet labeled from the top",
		Long: `progress reads a worksheet labeled from the top and says, for each candidate,
"continue", "reject — stop" or "accept — stop", with how many more labels it
can take at most.

The worksheet lists the sample in random key order, so the labeled items at
its top are themselves a random sample. Label it from the top without skipping
items: a gap followed by labels breaks that and is refused. The draw folder is
checked as record checks it: drawn from this plan, its ledger and worksheet
the files the draw wrote.

A fixed plan (label n, accept at most c errors) stops by exact curtailment:
reject as soon as the errors exceed c, accept as soon as even all the
remaining items being errors would keep them at or below c. Neither risk
changes: every stop is the decision the full sample would give. A sequential
plan (probity plan --design sequential) stops at its own boundaries.
Items labeled "unsure" count as errors toward acceptance and as correct
toward rejection. Spare items are ignored.

A plan with measures (probity plan --measure) is assessed claim by claim:
each (measure, candidate) claim counts the items the draw fixed for it, and
is decided only when every completion of its remaining counted labels gives
the same verdict under the plan's multiplicity ("cannot pass" or "cannot
fail whatever the remaining labels"); an unsure item counts as not labeled.

` + labelCellHelp + `

` + exitHelp("the worksheet was assessed, whatever the decision", "", false),
		Args: cobra.NoArgs,
		PreRunE: func(cmd *cobra.Command, args []string) error {
			for _, f := range []struct{ name, v string }{{"plan", opts.planPath}, {"draw", opts.drawDir}, {"labels", opts.labels}} {
				if f.v == "" {
					return inputerr.Errorf("--%s is required", f.name).WithHint("see 'probity progress --help'")
				}
			}
			return nil
		},
		RunE: func(cmd *cobra.Command, args []string) error {
			return runProgress(d, opts)
		},
	}
	fl := cmd.Flags()
	fl.StringVar(&opts.planPath, "plan", "", "the plan `FILE` the sample was drawn from")
	fl.StringVar(&opts.drawDir, "draw", "", "the draw folder `DIR` (manifest.json, ledger.csv, worksheet.csv)")
	fl.StringVar(&opts.labels, "labels", "", "the worksheet `FILE`, labeled from the top")
	fl.BoolVar(&opts.json, "json", false, "print one JSON object instead of the table")
	return cmd
}

// progressReport is the --json output.
type progressReport struct {
	Plan            string                `json:"plan"`
	PlanFingerprint string                `json:"plan_fingerprint"`
	Labels          string                `json:"labels"`
	Period          string                `json:"period"`
	Candidates      []progressCandidateJS `json:"candidates"`
	*progress.Result
}

// progressCandidateJS adds the printed decision ("reject — stop") and a
// stop flag to each candidate.
type progressCandidateJS struct {
	progress.Candidate
	Stop   bool   `json:"stop"`
	Status string `json:"status"`
}

func runProgress(d deps, opts *progressOptions) error {
	p, fingerprint, err := planfile.LoadForJudging(opts.planPath)
	if err != nil {
		return err
	}
	f, err := drawfolder.Open(opts.drawDir, fingerprint, p.CandidateNames())
	if err != nil {
		return err
	}
	l, err := drawfolder.ReadLabels(opts.labels)
	if err != nil {
		return err
	}
	in := progress.Input{Plan: p, Ledger: f.Ledger, Worksheet: l.Rows, WorksheetName: l.Path,
		Strata: f.Manifest.Strata, Rates: f.Manifest.AnticipatedRates()}
	if p.Measures != nil {
		return runProgressMeasures(d, opts, fingerprint, in, f.Manifest)
	}
	res, err := progress.Assess(in)
	if err != nil {
		return err
	}
	if opts.json {
		rep := progressReport{Plan: opts.planPath, PlanFingerprint: fingerprint, Labels: opts.labels, Period: f.Manifest.Period, Result: res}
		for _, c := range res.Candidates {
			rep.Candidates = append(rep.Candidates, progressCandidateJS{Candidate: c, Stop: c.Decision != sequential.Continue, Status: progressStatus(c.Decision)})
		}
		enc := json.NewEncoder(d.stdout)
		enc.SetEscapeHTML(false)
		enc.SetIndent("", "  ")
		return enc.Encode(rep)
	}
	writeProgress(d.stdout, p, res)
	return nil
}

// progressStatus is the printed decision.
func progressStatus(d sequential.Decision) string {
	switch d {
	case sequential.Accept:
		return "accept — stop"
	case sequential.Reject:
		return "reject — stop"
	}
	return "continue"
}

// writeProgress prints the human-readable assessment.
func writeProgress(w io.Writer, p *plan.File, res *progress.Result) {
	switch {
	case res.Design == plan.DesignSequential:
		fmt.Fprintf(w, "Sequential plan: at most %d labels; each candidate stops at its boundaries.\n", res.SampleSize)
	case res.Rule == record.RuleStratifiedCount:
		fmt.Fprintf(w, "Fixed plan judged by the stratified count rule (the allocation is not exactly proportional): %d labels, accept with at most %s among the %d counted items; stopping early only when every completion gives the same verdict.\n",
			res.SampleSize, countOf(*res.AcceptanceNumber, "error", "errors"), res.CountedSize)
	default:
		fmt.Fprintf(w, "Fixed plan: %d labels, accept with at most %s; stopping early by exact curtailment (no change to either risk).\n",
			res.SampleSize, countOf(*res.AcceptanceNumber, "error", "errors"))
	}
	fmt.Fprintf(w, "Labeled from the top: %d of %d.\n\n", res.Labeled, res.SampleSize)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "candidate\tlabeled\terrors\tdecision\tlabels left (at most)\twhy")
	for _, c := range res.Candidates {
		errs := fmt.Sprint(c.Errors)
		if c.Unsure > 0 {
			errs += fmt.Sprintf(" +%d unsure", c.Unsure)
		}
		labeled := fmt.Sprint(c.Labeled)
		if c.Decision != sequential.Continue && c.StoppedAt != c.Labeled {
			labeled = fmt.Sprintf("%d (stopped at %d)", c.Labeled, c.StoppedAt)
		}
		why := c.Reason
		if c.Decision == sequential.Continue && c.AcceptAfter > 0 {
			why += fmt.Sprintf("; accepts after %d more without an error", c.AcceptAfter)
		}
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%d\t%s\n", c.Name, labeled, errs, progressStatus(c.Decision), c.MaxRemaining, why)
	}
	tw.Flush()
	fmt.Fprintln(w)
	req := p.Inputs.Require
	if req == plan.RequireUnset {
		req = plan.RequireAll
	}
	switch res.Overall {
	case sequential.Continue:
		fmt.Fprintf(w, "Audit (require %s): continue — at most %s.\n", req, countOf(res.MaxRemaining, "more label", "more labels"))
	default:
		fmt.Fprintf(w, "Audit (require %s): %s; run probity record on the labels to issue the record.\n", req, progressStatus(res.Overall))
	}
	for _, n := range res.Notes {
		fmt.Fprintf(w, "Note: %s.\n", strings.TrimSuffix(n, "."))
	}
}
