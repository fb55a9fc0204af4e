package main

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"time"

	"github.com/spf13/cobra"

	"probity/plan"
	"probity/plan/inputerr"
	"probity/sampling/demolog"
	"probity/sampling/drawfolder"
	"probity/sampling/safewrite"
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
regional railway auditing its weld-scan classifier for October and November
2026 — with no files needed: it writes each month's prediction log, makes
the plan, draws the samples, labels them from the scenario's hidden ground
truth (a few items are marked unsure and replaced by spares; in November 60
items are labeled twice and the disagreements adjudicated), asks midway
whether labeling may stop early, issues each month's acceptance record
sealed with the operator's key, has the preparer and the reviewer sign the
November record electronically (the approver has not signed yet), verifies
it against the signers file and draws the trend. Every step runs the real
command; DIR/commands.txt holds each command line and what it printed.

The organisation, the people, the classifier and the data are invented, and
every page of the demo's records says so. The demo's keys are made from
fixed bytes published with the source: verify recognises them and never
trusts them, so the demo's verify step ends with exit 1, as it must, and
its trend charts the records as unauthenticated.

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

// demoPlan is the plan file of the demo, inside its folder.
const demoPlan = "plan.yaml"

// demoUnsureAt are the main items (1-based, among main items) the simulated
// labeler marks unsure.
var demoUnsureAt = []int{112, 407, 1333}

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

// demoSigners are the demo's signers: the people of the sign-off and the
// operator, each with the role their key may sign in.
var demoSigners = []struct{ name, role, key string }{
	{"Maren Tøllefsen", "prepared", "keys/demo-preparer"},
	{"Dr. Ilse Brandvold-Achebe", "reviewed", "keys/demo-reviewer"},
	{"Track asset audit operations", "operator", "keys/demo-signing-key"},
}

// demoSignersFile is the name of the demo's signers file.
const demoSignersFile = "signers.yaml"

// demoRun is one step of the demo: a probity command line and its outcome.
type demoRun struct {
	args   []string
	stdout string
	stderr string
	code   int
}

func runDemo(d deps, o *demoOptions) error {
	months := demolog.Months()
	sc := months[len(months)-1]
	release, err := safewrite.PrepareFolder(o.out, o.force, isDemoFolder)
	if errors.Is(err, safewrite.ErrNotEmpty) && inputerr.HintOf(err) == "" {
		return inputerr.SetHint(err, "give another --out, or --force to replace an earlier demo's artifacts")
	}
	if err != nil {
		return err
	}
	defer release()
	// The steps run inside DIR with paths relative to it, as a user would
	// type them there (each command takes them from DIR, deps.dir): the
	// command log can be replayed there, and the artifacts (which record
	// the paths they were given) do not depend on where DIR is. base is
	// DIR for the demo's own files, shown is DIR as the user named it.
	base, err := filepath.Abs(o.out)
	if err != nil {
		return err
	}
	in := func(p string) string { return filepath.Join(base, p) }
	shown := func(p string) string { return filepath.Join(o.out, p) }
	var cmdlog bytes.Buffer
	fmt.Fprintf(&cmdlog, "probity demo — %s\n%s: %s %s.\nEverything here is invented.\n\n", version, sc.Organisation, sc.System, sc.Description)

	if err := writeDemoFile(in("signoff.yaml"), func(w io.Writer) error { _, err := io.WriteString(w, demoSignoff); return err }); err != nil {
		return err
	}
	step := func(args ...string) (demoRun, error) {
		r := runDemoStep(d, base, &cmdlog, demolog.Clock, args)
		if r.code == exitBadInput || r.code == exitInternal {
			return r, &internalError{msg: fmt.Sprintf("demo step 'probity %s' failed (exit %d): %s", strings.Join(args, " "), r.code, firstLine(r.stderr))}
		}
		return r, nil
	}

	const planPath, keyPath = demoPlan, "keys/demo-signing-key"
	planRun, err := step("plan", "--ceiling", "0.02", "--confidence", "0.95", "--anticipated", "0.01", "--producer-risk", "0.10",
		"--thresholds", "defect_score:0.35,0.50,0.65", "--positive", demolog.Defect, "--negative", demolog.Sound,
		"--require", "any", "--system", sc.System, "--system-version", sc.SystemVersion,
		"--seed", demolog.PlanSeed, "--out", planPath)
	if err != nil {
		return err
	}
	if err := os.MkdirAll(in(filepath.Dir(keyPath)), 0o700); err != nil {
		return err
	}
	fingerprints := map[string]string{}
	for _, s := range demoSigners {
		keyDeps := d
		keyDeps.random = demolog.ThrowAwayKeySource()
		if s.role != "operator" {
			keyDeps.random = demolog.SignerKeySource(s.role)
		}
		r := runDemoStep(keyDeps, base, &cmdlog, demolog.Clock, []string{"keygen", "--out", s.key})
		if r.code != exitOK {
			return &internalError{msg: "demo step keygen failed: " + firstLine(r.stderr)}
		}
		for _, l := range strings.Split(r.stdout, "\n") {
			if fp, ok := strings.CutPrefix(l, "fingerprint: "); ok {
				fingerprints[s.key] = fp
			}
		}
	}
	if err := writeDemoFile(in(demoSignersFile), func(w io.Writer) error {
		fmt.Fprintln(w, "# Who signs the demo's records, in which role, with which key (invented people).")
		fmt.Fprintln(w, "signers:")
		for _, s := range demoSigners {
			fmt.Fprintf(w, "  - name: %s\n    roles: [%s]\n    key: %s\n", s.name, s.role, fingerprints[s.key])
		}
		return nil
	}); err != nil {
		return err
	}

	w := d.stdout
	fmt.Fprintf(w, "probity demo: %s — %s (invented scenario)\n", sc.Organisation, sc.System)
	fmt.Fprintf(w, "  plan      %s: %s\n", shown(planPath), firstLine(planRun.stdout))
	var recDirs []string
	var last demoMonth
	for i, m := range months {
		res, err := runDemoMonth(m, base, step, &cmdlog, keyPath, i == len(months)-1)
		if err != nil {
			return err
		}
		recDirs = append(recDirs, res.recDir)
		last = res
		fmt.Fprintf(w, "  %s   log     %s (%d decisions)\n", m.Month, shown(res.logPath), m.Rows)
		fmt.Fprintf(w, "            sample  %s/ (%d items labeled; %d unsure replaced by spares)\n", shown(res.drawDir), res.labeled, res.unsure)
		if res.doubled > 0 {
			fmt.Fprintf(w, "            double  %d items labeled twice, %d disagreements adjudicated (%s)\n", res.doubled, res.adjudicated, shown(res.adjudicatedPath))
		}
		fmt.Fprintf(w, "            record  %s (%s, exit %d)\n", shown(filepath.Join(res.recDir, "record.pdf")), demoOverall(res.record.stdout), res.record.code)
	}
	for _, l := range indentedLines(last.record.stdout, 6)[1:] {
		fmt.Fprintf(w, "            %s\n", l)
	}
	// The preparer and the reviewer sign the November record, an hour
	// apart, after it was issued; the approver has not signed yet.
	for i, s := range demoSigners[:2] {
		at := demolog.Clock.Add(time.Duration(2+3*i) * time.Hour)
		r := runDemoStep(d, base, &cmdlog, at, []string{"sign", last.recDir, "--role", s.role, "--key", s.key, "--signers", demoSignersFile})
		if r.code != exitOK {
			return &internalError{msg: "demo step sign failed: " + firstLine(r.stderr)}
		}
		fmt.Fprintf(w, "            signed  %s by %s, %s UTC\n", s.role, s.name, at.Format("2006-01-02 15:04"))
	}
	ver := runDemoStep(d, base, &cmdlog, demolog.Clock.Add(24*time.Hour), []string{"verify", last.recDir, "--signers", demoSignersFile,
		"--plan", planPath, "--draw", last.drawDir, "--labels", last.labelsPath,
		"--second", last.secondPath, "--adjudicated", last.adjudicatedPath, "--log", last.logPath})
	if ver.code == exitBadInput || ver.code == exitInternal {
		return &internalError{msg: fmt.Sprintf("demo step verify failed (exit %d): %s", ver.code, firstLine(ver.stderr))}
	}
	trend, err := step(append(append([]string{"trend"}, recDirs...), "--chart", "trend", "--signers", demoSignersFile, "--allow-unauthenticated")...)
	if err != nil {
		return err
	}
	if err := writeDemoFile(in("commands.txt"), func(w io.Writer) error { _, err := w.Write(cmdlog.Bytes()); return err }); err != nil {
		return err
	}
	other := demoOtherFailures(ver.stdout)
	verdict := "every check passed but authentication, as it must: the demo's keys are published (exit 1)"
	if ver.code == exitOK || len(other) > 0 {
		verdict = fmt.Sprintf("UNEXPECTED (exit %d): %s", ver.code, strings.Join(other, "; "))
	}
	fmt.Fprintf(w, "  verify    %s: %s\n", shown(last.recDir), verdict)
	fmt.Fprintf(w, "  trend     %s, %s (exit %d): %s; charted as unauthenticated\n", shown("trend.png"), shown("trend.pdf"), trend.code, demoTrendFlags(trend.stdout))
	fmt.Fprintf(w, "every command and its output: %s (replay it inside %s)\n", shown("commands.txt"), o.out)
	if ver.code == exitOK || len(other) > 0 {
		return rejected("the demo's record did not verify as a demonstration record should")
	}
	return nil
}

// demoOtherFailures lists the failed checks of verify's output that are not
// about the published demo keys: a demo record must fail authentication
// for that reason alone.
func demoOtherFailures(out string) []string {
	var other []string
	for _, l := range strings.Split(out, "\n") {
		if strings.HasPrefix(l, "FAIL") && !strings.Contains(l, "published demonstration key") {
			other = append(other, strings.TrimSpace(strings.TrimPrefix(l, "FAIL")))
		}
	}
	return other
}

// demoMonth is what one audited month of the demo produced.
type demoMonth struct {
	logPath, drawDir, labelsPath, recDir string
	// secondPath and adjudicatedPath are set for the month with double
	// labeling.
	secondPath, adjudicatedPath string
	labeled, unsure, doubled    int
	adjudicated                 int
	record                      demoRun
}

// demoDouble is how many items of the latest month get an independent
// second label, and demoSecondWrongAt where (among them) the second
// labeler slips.
const demoDouble = 60

var demoSecondWrongAt = []int{9, 41}

// runDemoMonth writes one month's log, draws its sample, labels it from
// the hidden truth and issues its signed record. For the latest month it
// also asks `progress` about the first 400 labels, as an operator would
// midway through labeling.
func runDemoMonth(m demolog.Scenario, base string, step func(...string) (demoRun, error), cmdlog *bytes.Buffer, keyPath string, latest bool) (demoMonth, error) {
	res := demoMonth{
		logPath:    "prediction-log-" + m.Month + ".csv.gz",
		drawDir:    "draw-" + m.Month,
		labelsPath: filepath.Join("labels-"+m.Month, "worksheet-labeled.csv"),
		recDir:     "record-" + m.Month,
	}
	if err := writeDemoFile(filepath.Join(base, res.logPath), m.WriteLogGzip); err != nil {
		return res, err
	}
	drawArgs := []string{"draw", "--plan", "plan.yaml", "--log", res.logPath, "--out", res.drawDir, "--period", m.Month,
		"--strata", "section", "--spare", "2", "--show", "scan_ref,inspected_on,weld_type", "--quiet"}
	if latest {
		drawArgs = append(drawArgs, "--double", strconv.Itoa(demoDouble))
	}
	if _, err := step(drawArgs...); err != nil {
		return res, err
	}
	summary, firstRows, err := demoLabel(m, base, res.drawDir, res.labelsPath, 0)
	if err != nil {
		return res, err
	}
	if latest {
		if err := demoSecondLabels(m, base, &res, firstRows); err != nil {
			return res, err
		}
		fmt.Fprintf(cmdlog, "# simulated second labeling of the %d doubled items by %s, who disagrees on %d; %s adjudicated them: %s\n\n",
			res.doubled, demolog.SecondLabeler, res.adjudicated, demolog.Adjudicator, res.adjudicatedPath)
	}
	res.labeled, res.unsure = summary.Labeled, len(summary.Unsure)
	fmt.Fprintf(cmdlog, "# simulated labeling of %s: %d items labeled from the hidden truth by %s; %d marked unsure (%s), replaced by spares %s\n\n",
		m.Month, summary.Labeled, demolog.Labeler, len(summary.Unsure), strings.Join(summary.Unsure, ", "), strings.Join(summary.SparesUsed, ", "))
	if latest {
		partial := filepath.Join("labels-"+m.Month, "worksheet-first-400.csv")
		if _, _, err := demoLabel(m, base, res.drawDir, partial, 400); err != nil {
			return res, err
		}
		if _, err := step("progress", "--plan", "plan.yaml", "--draw", res.drawDir, "--labels", partial); err != nil {
			return res, err
		}
	}
	date := demolog.Clock.Format("2006-01-02")
	if !latest {
		date = demolog.Clock.AddDate(0, -1, 0).Format("2006-01-02")
	}
	recordArgs := []string{"record", "--plan", "plan.yaml", "--draw", res.drawDir, "--labels", res.labelsPath, "--out", res.recDir,
		"--use", "safety", "--signoff", "signoff.yaml", "--sign-key", keyPath, "--date", date}
	if res.secondPath != "" {
		recordArgs = append(recordArgs, "--second", res.secondPath, "--adjudicated", res.adjudicatedPath)
	}
	res.record, err = step(recordArgs...)
	return res, err
}

// demoSecondLabels labels the draw's worksheet-second.csv as the second
// labeler would and writes the adjudication of every disagreement.
func demoSecondLabels(m demolog.Scenario, base string, res *demoMonth, first []drawfolder.WorksheetRow) error {
	f, err := openDemoDraw(base, res.drawDir)
	if err != nil {
		return err
	}
	_, rows, err := drawfolder.ReadWorksheet(f.Path(drawfolder.WorksheetSecondFile))
	if err != nil {
		return err
	}
	second, err := m.LabelSecond(rows, demoSecondWrongAt)
	if err != nil {
		return err
	}
	dir := filepath.Dir(res.labelsPath)
	res.secondPath = filepath.Join(dir, "worksheet-second-labeled.csv")
	res.adjudicatedPath = filepath.Join(dir, "adjudication.csv")
	res.doubled = len(second)
	if err := writeDemoFile(filepath.Join(base, res.secondPath), func(w io.Writer) error { return drawfolder.WriteWorksheet(w, f.Manifest.ShowColumns, second) }); err != nil {
		return err
	}
	return writeDemoFile(filepath.Join(base, res.adjudicatedPath), func(w io.Writer) error {
		n, err := m.WriteAdjudications(w, first, second)
		res.adjudicated = n
		return err
	})
}

// demoOverall picks the overall verdict out of record's output.
func demoOverall(out string) string {
	for _, l := range strings.Split(out, "\n") {
		if v, ok := strings.CutPrefix(l, "overall: "); ok && v != "" {
			return "overall " + strings.Fields(v)[0]
		}
	}
	return "no verdict printed"
}

// demoTrendFlags picks the flag lines out of trend's output.
func demoTrendFlags(out string) string {
	var flags []string
	for _, l := range strings.Split(out, "\n") {
		if strings.Contains(l, "flagged:") {
			flags = append(flags, strings.Join(strings.Fields(l), " "))
		}
	}
	if len(flags) == 0 {
		return "no month flagged against the baseline"
	}
	return strings.Join(flags, "; ")
}

// runDemoStep runs one probity command line inside the folder base (its
// relative paths are taken from there) in a fresh command tree with the
// scenario's clock at now, no terminal and no environment, and captured
// streams, and appends it to the command log. The paths the command prints
// under base are shown relative to it, as the same command line typed
// inside base prints them.
func runDemoStep(d deps, base string, cmdlog *bytes.Buffer, now time.Time, args []string) demoRun {
	var out, errb bytes.Buffer
	sub := d
	sub.stdin = strings.NewReader("")
	sub.stdout, sub.stderr = &out, &errb
	sub.now = func() time.Time { return now }
	sub.getenv, sub.readPassword = nil, nil
	sub.stderrIsTerminal, sub.stdoutIsTerminal = false, false
	sub.dir = base
	code := run(args, sub)
	inBase := func(s string) string { return strings.ReplaceAll(s, base+string(filepath.Separator), "") }
	r := demoRun{args: args, stdout: inBase(out.String()), stderr: inBase(errb.String()), code: code}
	fmt.Fprintf(cmdlog, "$ probity %s\n%s", quoteArgs(args), r.stdout)
	if r.stderr != "" {
		fmt.Fprintf(cmdlog, "[stderr]\n%s", r.stderr)
	}
	fmt.Fprintf(cmdlog, "[exit %d]\n\n", code)
	return r
}

// demoLabel fills the drawn worksheet from the scenario's hidden truth and
// writes it to path. With prefix > 0 only the first prefix items keep their
// labels, as midway through labeling from the top.
func demoLabel(sc demolog.Scenario, base, drawDir, path string, prefix int) (demolog.LabelingSummary, []drawfolder.WorksheetRow, error) {
	var sum demolog.LabelingSummary
	f, err := openDemoDraw(base, drawDir)
	if err != nil {
		return sum, nil, err
	}
	labeled, sum, err := sc.Label(f.Worksheet, f.Ledger, demoUnsureAt)
	if err != nil {
		return sum, nil, err
	}
	if prefix > 0 {
		for i := prefix; i < len(labeled); i++ {
			labeled[i].Label, labeled[i].Note, labeled[i].Labeler = "", "", ""
		}
	}
	err = writeDemoFile(filepath.Join(base, path), func(w io.Writer) error { return drawfolder.WriteWorksheet(w, f.Manifest.ShowColumns, labeled) })
	return sum, labeled, err
}

// openDemoDraw opens a draw folder of the demo against the demo's plan,
// as record and progress open it.
func openDemoDraw(base, drawDir string) (*drawfolder.Folder, error) {
	p, fp, err := plan.LoadForJudging(filepath.Join(base, demoPlan))
	if err != nil {
		return nil, err
	}
	return drawfolder.Open(filepath.Join(base, drawDir), fp, p.CandidateNames())
}

// demoArtifact matches the names the demo writes at the top of its folder.
var demoArtifact = regexp.MustCompile(`^(commands\.txt|signoff\.yaml|signers\.yaml|plan\.yaml|keys|trend\.(png|pdf)|prediction-log-[0-9]{4}-[0-9]{2}\.csv\.gz|(draw|labels|record)-[0-9]{4}-[0-9]{2})$`)

// isDemoFolder recognises a folder an earlier demo filled: it holds the
// demo's command log and plan, and nothing the demo does not write.
func isDemoFolder(names []string) bool {
	if !slices.Contains(names, "commands.txt") || !slices.Contains(names, "plan.yaml") {
		return false
	}
	for _, n := range names {
		if !demoArtifact.MatchString(n) {
			return false
		}
	}
	return true
}

// writeDemoFile writes a file of the demo through safewrite.
func writeDemoFile(path string, write func(io.Writer) error) error {
	return safewrite.Write([]safewrite.File{{Path: path, Stream: write}}, safewrite.Options{Replace: true})
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

// quoteArgs renders argv for the command log, quoting what a shell would split.
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
