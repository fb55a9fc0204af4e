package main

import (
	"bytes"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"time"

	"github.com/spf13/cobra"

	"probity/sampling"
	"probity/sampling/demolog"
)

// demoOptions are the flags of probity demo.
type demoOptions struct {
	out   string
	force bool
}

// newDemoCommand builds `probity demo`.
func newDemoCommand(d deps) *cobra.Command {
	opts := &demoOptions{}
	cmd := &cobra.Command{
		Use:   "demo [--out DIR]",
		Short: "Run a whole audit on an invented scenario: plan, draw, labels, signed record, verify",
		Long: `demo runs the whole job on a scenario compiled into probity — an invented
regional railway auditing its weld-scan classifier for November 2026 — with
no files needed: it writes the prediction log, makes the plan, draws the
sample, labels it from the scenario's hidden ground truth (a few items are
marked unsure and replaced by spares), issues a signed acceptance record
with a throw-away key, and verifies it. Every step runs the real command;
DIR/transcript.txt holds each command line and what it printed.

The organisation, the classifier and the data are invented. The demo key is
published with the source: it signs nothing but demo records.

` + exitCodesHelp,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			return runDemo(d, opts)
		},
	}
	cmd.Flags().StringVar(&opts.out, "out", "probity-demo", "the folder to write every artifact into")
	cmd.Flags().BoolVar(&opts.force, "force", false, "replace the artifacts of an earlier demo in --out")
	return cmd
}

// demoUnsureAt are the main items (1-based, among main items) the simulated
// labeler marks unsure.
var demoUnsureAt = []int{12, 407, 1333}

// demoSignoff is the sign-off file of the demo: invented people.
const demoSignoff = `prepared:
  name: Maren Tøllefsen
  title: Inspection data lead, track assets
  date: 2026-12-01
reviewed:
  name: Dr. Ilse Brandvold-Achebe
  title: Model-risk reviewer
approved:
  title: Head of track safety
`

// demoRun is one step of the demo: a probity command line and its outcome.
type demoRun struct {
	args   []string
	stdout string
	stderr string
	code   int
}

func runDemo(d deps, o *demoOptions) error {
	sc := demolog.Default()
	if err := prepareDemoDir(o.out, o.force); err != nil {
		return err
	}
	// The steps run inside DIR with relative paths, as a user would type
	// them: the transcript can be replayed there, and the artifacts (which
	// record the paths they were given) do not depend on where DIR is.
	shown := o.out
	back, err := os.Getwd()
	if err != nil {
		return err
	}
	if err := os.Chdir(o.out); err != nil {
		return badInput(err)
	}
	defer os.Chdir(back)
	at := func(parts ...string) string { return filepath.Join(parts...) }
	outPath := func(parts ...string) string { return filepath.Join(append([]string{shown}, parts...)...) }
	var transcript bytes.Buffer
	fmt.Fprintf(&transcript, "probity demo — %s\n%s %s %s.\nEverything here is invented.\n\n", version, sc.Organisation, sc.System, sc.Description)

	logPath := at("prediction-log-2026-11.csv.gz")
	if err := writeDemoFile(logPath, sc.WriteLogGzip); err != nil {
		return err
	}
	if err := writeDemoFile(at("signoff.yaml"), func(w io.Writer) error { _, err := io.WriteString(w, demoSignoff); return err }); err != nil {
		return err
	}
	step := func(args ...string) (demoRun, error) {
		r := runDemoStep(d, &transcript, args)
		if r.code == exitBadInput || r.code == exitInternal {
			return r, &internalError{msg: fmt.Sprintf("demo step 'probity %s' failed (exit %d): %s", strings.Join(args, " "), r.code, firstLine(r.stderr))}
		}
		return r, nil
	}

	planPath, drawDir := at("plan.yaml"), at("draw-2026-11")
	plan, err := step("plan", "--ceiling", "0.02", "--confidence", "0.95", "--anticipated", "0.01", "--producer-risk", "0.10",
		"--thresholds", "defect_score:0.35,0.50,0.65", "--positive", demolog.Defect, "--negative", demolog.Sound,
		"--require", "any", "--system", sc.System, "--system-version", sc.SystemVersion,
		"--seed", demolog.PlanSeed, "--out", planPath)
	if err != nil {
		return err
	}
	if _, err := step("draw", "--plan", planPath, "--log", logPath, "--out", drawDir, "--period", "2026-11",
		"--strata", "section", "--spare", "2", "--show", "scan_ref,inspected_on,weld_type", "--quiet"); err != nil {
		return err
	}

	labelsPath, summary, err := demoLabel(sc, drawDir, at("labels"))
	if err != nil {
		return err
	}
	fmt.Fprintf(&transcript, "# simulated labeling: %d items labeled from the hidden truth by %s; %d marked unsure (%s), replaced by spares %s\n\n",
		summary.Labeled, demolog.Labeler, len(summary.Unsure), strings.Join(summary.Unsure, ", "), strings.Join(summary.SparesUsed, ", "))

	keyPath := at("keys", "demo-signing-key")
	if err := os.MkdirAll(filepath.Dir(keyPath), 0o700); err != nil {
		return err
	}
	keyDeps := d
	keyDeps.random = demolog.ThrowAwayKeySource()
	if r := runDemoStep(keyDeps, &transcript, []string{"keygen", "--out", keyPath}); r.code != exitOK {
		return &internalError{msg: "demo step keygen failed: " + firstLine(r.stderr)}
	}
	recDir := at("record-2026-11")
	rec, err := step("record", "--plan", planPath, "--draw", drawDir, "--labels", labelsPath, "--out", recDir,
		"--use", "safety", "--signoff", at("signoff.yaml"), "--sign-key", keyPath, "--date", demolog.Clock.Format("2006-01-02"))
	if err != nil {
		return err
	}
	ver, err := step("verify", recDir, "--pub", keyPath+".pub", "--plan", planPath, "--draw", drawDir, "--labels", labelsPath, "--log", logPath)
	if err != nil {
		return err
	}
	if err := writeDemoFile(at("transcript.txt"), func(w io.Writer) error { _, err := w.Write(transcript.Bytes()); return err }); err != nil {
		return err
	}

	w := d.stdout
	fmt.Fprintf(w, "probity demo: %s — %s (invented scenario)\n", sc.Organisation, sc.System)
	fmt.Fprintf(w, "  log     %s  (%d decisions, 4 line sections, tunnels rare)\n", outPath(logPath), sc.Rows)
	fmt.Fprintf(w, "  plan    %s  %s\n", outPath(planPath), firstLine(plan.stdout))
	fmt.Fprintf(w, "  draw    %s/  worksheet.csv, ledger.csv, manifest.json (period 2026-11)\n", outPath(drawDir))
	fmt.Fprintf(w, "  labels  %s  (%d labeled, %d unsure replaced by spares)\n", outPath(labelsPath), summary.Labeled, len(summary.Unsure))
	fmt.Fprintf(w, "  record  %s  (exit %d)\n", outPath(recDir, "record.pdf"), rec.code)
	for _, l := range indentedLines(rec.stdout, 10) {
		fmt.Fprintf(w, "          %s\n", l)
	}
	verdict := "all checks passed"
	if ver.code != exitOK {
		verdict = "FAILED: " + firstLine(ver.stdout+ver.stderr)
	}
	fmt.Fprintf(w, "  verify  %s\n", verdict)
	fmt.Fprintf(w, "every command and its output: %s (replay it inside %s)\n", outPath("transcript.txt"), shown)
	if ver.code != exitOK {
		return rejected("the demo's record did not verify")
	}
	return nil
}

// runDemoStep runs one probity command line in a fresh command tree with
// the scenario's clock, no terminal, and captured streams, and appends it
// to the transcript.
func runDemoStep(d deps, transcript *bytes.Buffer, args []string) demoRun {
	var out, errb bytes.Buffer
	sub := d
	sub.stdin = strings.NewReader("")
	sub.stdout, sub.stderr = &out, &errb
	sub.now = func() time.Time { return demolog.Clock }
	sub.stderrIsTerminal, sub.stdoutIsTerminal = false, false
	code := run(args, sub)
	fmt.Fprintf(transcript, "$ probity %s\n%s", quoteArgs(args), out.String())
	if errb.Len() > 0 {
		fmt.Fprintf(transcript, "[stderr]\n%s", errb.String())
	}
	fmt.Fprintf(transcript, "[exit %d]\n\n", code)
	return demoRun{args: args, stdout: out.String(), stderr: errb.String(), code: code}
}

// demoLabel fills the drawn worksheet from the scenario's hidden truth and
// writes it to dir/worksheet-labeled.csv.
func demoLabel(sc demolog.Scenario, drawDir, dir string) (string, demolog.LabelingSummary, error) {
	var sum demolog.LabelingSummary
	m, _, err := sampling.ReadManifest(filepath.Join(drawDir, sampling.ManifestFile))
	if err != nil {
		return "", sum, err
	}
	_, rows, err := sampling.ReadWorksheet(filepath.Join(drawDir, sampling.WorksheetFile))
	if err != nil {
		return "", sum, err
	}
	names, err := demoCandidateNames(drawDir)
	if err != nil {
		return "", sum, err
	}
	ledger, err := sampling.ReadLedger(filepath.Join(drawDir, sampling.LedgerFile), names)
	if err != nil {
		return "", sum, err
	}
	labeled, sum, err := sc.Label(rows, ledger, demoUnsureAt)
	if err != nil {
		return "", sum, err
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return "", sum, err
	}
	path := filepath.Join(dir, "worksheet-labeled.csv")
	err = writeDemoFile(path, func(w io.Writer) error { return sampling.WriteWorksheet(w, m.ShowColumns, labeled) })
	return path, sum, err
}

// demoCandidateNames reads the candidate columns from the ledger header.
func demoCandidateNames(drawDir string) ([]string, error) {
	data, err := os.ReadFile(filepath.Join(drawDir, sampling.LedgerFile))
	if err != nil {
		return nil, err
	}
	header, _, _ := strings.Cut(string(data), "\n")
	fixed := len(sampling.LedgerHeader(nil))
	cols := strings.Split(strings.TrimRight(header, "\r"), ",")
	if len(cols) <= fixed {
		return nil, fmt.Errorf("%s: no candidate columns", sampling.LedgerFile)
	}
	return cols[fixed:], nil
}

// prepareDemoDir makes DIR, refusing a non-empty one unless force, in which
// case the previous demo's artifacts are removed first.
func prepareDemoDir(dir string, force bool) error {
	entries, err := os.ReadDir(dir)
	switch {
	case os.IsNotExist(err):
		return os.MkdirAll(dir, 0o755)
	case err != nil:
		return badInput(err)
	case len(entries) > 0 && !force:
		return withHint(usageErrorf("%s is not empty", dir), "give another --out, or --force to replace an earlier demo's artifacts")
	}
	for _, e := range entries {
		if err := os.RemoveAll(filepath.Join(dir, e.Name())); err != nil {
			return err
		}
	}
	return nil
}

// writeDemoFile writes a file through a temporary name and a rename.
func writeDemoFile(path string, write func(io.Writer) error) error {
	if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
		return err
	}
	tmp, err := os.CreateTemp(filepath.Dir(path), ".tmp-"+filepath.Base(path)+"-*")
	if err != nil {
		return err
	}
	if err := write(tmp); err != nil {
		tmp.Close()
		os.Remove(tmp.Name())
		return err
	}
	if err := tmp.Close(); err != nil {
		os.Remove(tmp.Name())
		return err
	}
	return os.Rename(tmp.Name(), path)
}

func firstLine(s string) string {
	l, _, _ := strings.Cut(strings.TrimSpace(s), "\n")
	return l
}

// indentedLines returns at most max non-empty lines of s.
func indentedLines(s string, max int) []string {
	var out []string
	for _, l := range strings.Split(strings.TrimRight(s, "\n"), "\n") {
		if strings.TrimSpace(l) == "" {
			continue
		}
		if len(out) == max {
			out = append(out, "…")
			break
		}
		out = append(out, l)
	}
	return out
}

// quoteArgs renders argv for the transcript, quoting what a shell would split.
func quoteArgs(args []string) string {
	q := make([]string, len(args))
	for i, a := range args {
		if a == "" || strings.ContainsAny(a, " \t'\"$&|;<>()*?") {
			q[i] = "'" + strings.ReplaceAll(a, "'", `'\''`) + "'"
		} else {
			q[i] = a
		}
	}
	return strings.Join(q, " ")
}
