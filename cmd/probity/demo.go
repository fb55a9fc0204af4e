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

	"probity/plan/inputerr"
	"probity/plan/numfmt"
	"probity/plan/planfile"
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

` + exitHelp("success: the demo ran and its signed record verified", "the demo's record did not verify", true),
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			return runDemo(d, opts)
		},
	}
	cmd.Flags().StringVar(&opts.out, "out", "probity-demo", "the folder `DIR` to write every artifact into")
	cmd.Flags().BoolVar(&opts.force, "force", false, "replace the artifacts of an earlier demo in --out")
	return cmd
}

// demoPlan is the plan file of the demo, inside its folder.
const demoPlan = "plan.yaml"

// demoUnsureAt are the main items (1-based, among main items) the simulated
// labeler marks unsure in a month: other positions each month, as real
// unsure items fall (a fixed table, so every run makes the same record).
func demoUnsureAt(month string) []int {
	if month == "2026-10" {
		return []int{112, 407, 1333}
	}
	return []int{158, 861, 1590}
}

// demoUnsureCount is how many items the simulated labeler marks unsure in
// every month.
const demoUnsureCount = 3

// demoSignoff is the sign-off file of the demo: invented people.
const demoSignoff = `prepared:
  name: Maren Tøllefsen
  title: Inspection data lead, track assets
  date: 2026-12-02
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
	// A missed defect can lead to a rail break: the plan certifies the miss
	// rate (fnr) of each threshold beside its overall error, and releases
	// the accepted threshold that misses least. The anticipated values
	// are the validation figures the scenario's operator had (near the
	// log's true values, sampling/demolog).
	planRun, err := step("plan", "--measure", "fnr:0.20", "--measure", "error:0.02", "--confidence", "0.95", "--producer-risk", "0.10",
		"--anticipated", "fnr:0.035,0.11,0.25", "--anticipated", "error:0.032,0.007,0.008", "--prevalence", "0.03", "--decisions", "240000",
		"--release", "best:fnr",
		"--thresholds", "defect_score:0.35,0.50,0.65", "--positive", demolog.Defect, "--negative", demolog.Sound,
		"--system", sc.System, "--system-version", sc.SystemVersion,
		"--seed", demolog.PlanSeed, "--time-column", demolog.TimeColumn, "--date", demoTime(demolog.PlanCreated), "--out", planPath)
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
		fmt.Fprintf(w, "  %s   log     %s (%s decisions)\n", m.Month, shown(res.logPath), numfmt.Count(m.Rows))
		fmt.Fprintf(w, "            sample  %s/ (%s items labeled; %d unsure replaced by spares)\n", shown(res.drawDir), numfmt.Count(res.labeled), res.unsure)
		if res.doubled > 0 {
			fmt.Fprintf(w, "            double  %d items labeled twice, %d disagreements adjudicated (%s)\n", res.doubled, res.adjudicated, shown(res.adjudicatedPath))
		}
		fmt.Fprintf(w, "            record  %s (%s, exit %d)\n", shown(filepath.Join(res.recDir, "record.pdf")), demoOverall(res.record.stdout), res.record.code)
	}
	for _, l := range demoRecordSummary(last.record.stdout) {
		fmt.Fprintf(w, "            %s\n", l)
	}
	// The preparer and the reviewer sign the November record the morning
	// after it was issued, three hours apart; the approver has not signed
	// yet.
	for i, s := range demoSigners[:2] {
		at := demolog.Clock.Add(time.Duration(24+2+3*i) * time.Hour)
		r := runDemoStep(d, base, &cmdlog, at, []string{"sign", last.recDir, "--role", s.role, "--key", s.key, "--signers", demoSignersFile})
		if r.code != exitOK {
			return &internalError{msg: "demo step sign failed: " + firstLine(r.stderr)}
		}
		fmt.Fprintf(w, "            signed  %s by %s, %s UTC\n", s.role, s.name, at.Format("2006-01-02 15:04"))
	}
	ver := runDemoStep(d, base, &cmdlog, demolog.Clock.Add(48*time.Hour), []string{"verify", last.recDir, "--signers", demoSignersFile,
		"--plan", planPath, "--draw", last.drawDir, "--trail", last.trailPath, "--adjudicated", last.adjudicatedPath, "--log", last.logPath})
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
	// trailPath is the label trail in the draw folder; firstRows the
	// first labeler's labels and summary what that labeling did.
	trailPath                string
	firstRows                []drawfolder.WorksheetRow
	summary                  demolog.LabelingSummary
	labeled, unsure, doubled int
	adjudicated              int
	record                   demoRun
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
	drawArgs := []string{"draw", "--plan", "plan.yaml", "--log", res.logPath, "--out", res.drawDir, "--period", m.Month, "--date", demoTime(m.Drawn()),
		"--strata", "section", "--spare", "2", "--show", "scan_ref,inspected_on,weld_type", "--quiet"}
	if latest {
		drawArgs = append(drawArgs, "--double", strconv.Itoa(demoDouble))
	}
	if _, err := step(drawArgs...); err != nil {
		return res, err
	}
	// The latest month is labeled on the page from the scenario's clock
	// on, and issued (m.Issued) once labeling is done.
	if err := demoLabelMonth(m, base, &res, latest, demolog.Clock); err != nil {
		return res, err
	}
	if latest {
		fmt.Fprintf(cmdlog, "# simulated labeling of %s on the labeling page (the server of probity label, in process; trail %s): %d items labeled from the hidden truth by %s; %d marked unsure (%s), replaced by the spares the page offered %s; the labeled worksheet derived from the trail: %s\n",
			m.Month, res.trailPath, res.labeled, demolog.Labeler, res.unsure, strings.Join(res.summary.Unsure, ", "), strings.Join(res.summary.SparesUsed, ", "), res.labelsPath)
	} else {
		fmt.Fprintf(cmdlog, "# simulated labeling of %s in a copy of the worksheet (a spreadsheet): %d items labeled from the hidden truth by %s; %d marked unsure (%s), replaced by spares %s: %s\n",
			m.Month, res.labeled, demolog.Labeler, res.unsure, strings.Join(res.summary.Unsure, ", "), strings.Join(res.summary.SparesUsed, ", "), res.labelsPath)
	}
	if latest {
		fmt.Fprintf(cmdlog, "# simulated second labeling of the %d doubled items on the second address by %s, who disagrees on %d; %s adjudicated them: %s\n",
			res.doubled, demolog.SecondLabeler, res.adjudicated, demolog.Adjudicator, res.adjudicatedPath)
	}
	fmt.Fprintln(cmdlog)
	if latest {
		partial := filepath.Join("labels-"+m.Month, "worksheet-first-400.csv")
		if err := demoPartial(base, res.drawDir, partial, res.firstRows, 400); err != nil {
			return res, err
		}
		if _, err := step("progress", "--plan", "plan.yaml", "--draw", res.drawDir, "--labels", partial); err != nil {
			return res, err
		}
	}
	labels := []string{"--labels", res.labelsPath}
	if res.trailPath != "" {
		labels = []string{"--trail", res.trailPath}
	}
	recordArgs := append(append([]string{"record", "--plan", "plan.yaml", "--draw", res.drawDir}, labels...), "--out", res.recDir,
		"--use", "safety", "--signoff", "signoff.yaml", "--sign-key", keyPath, "--date", demoTime(m.Issued()))
	if res.adjudicatedPath != "" {
		recordArgs = append(recordArgs, "--adjudicated", res.adjudicatedPath)
	}
	var err error
	res.record, err = step(recordArgs...)
	return res, err
}

// demoTime writes a scenario time as the demo passes it to --date, so the
// artifacts are the same on every run (and say the time was supplied).
func demoTime(t time.Time) string { return t.UTC().Format(time.RFC3339) }

// demoLabelMonth labels a month's draw from the scenario's hidden truth:
// the first labeler's labels (demolog.Scenario.Label, with the items of
// demoUnsureAt marked unsure and replaced by spares) and, for the latest
// month, the second labeler's on the doubled items. The latest month is
// labeled on the labeling page (demoLabelThroughPage), and its labeled
// worksheets are derived from the trail; an earlier one in a copy of the
// worksheet, as in a spreadsheet (both ways stay open to a user). It
// writes the labeled worksheets and the adjudication of every
// disagreement.
func demoLabelMonth(m demolog.Scenario, base string, res *demoMonth, latest bool, start time.Time) error {
	f, err := openDemoDraw(base, res.drawDir)
	if err != nil {
		return err
	}
	first, sum, err := m.Label(f.Worksheet, f.Ledger, demoUnsureAt(m.Month))
	if err != nil {
		return err
	}
	res.firstRows, res.summary = first, sum
	res.labeled, res.unsure = sum.Labeled, len(sum.Unsure)
	var second []drawfolder.WorksheetRow
	if latest {
		_, rows, err := drawfolder.ReadWorksheet(f.Path(drawfolder.WorksheetSecondFile))
		if err != nil {
			return err
		}
		if second, err = m.LabelSecond(rows, demoSecondWrongAt); err != nil {
			return err
		}
	}
	if !latest {
		return writeDemoFile(filepath.Join(base, res.labelsPath), func(w io.Writer) error { return drawfolder.WriteWorksheet(w, f.Manifest.ShowColumns, first) })
	}
	firstOut, secondOut, err := demoLabelThroughPage(base, res.drawDir, first, second, start)
	if err != nil {
		return err
	}
	res.trailPath = demoTrail(res.drawDir)
	if err := writeDemoFile(filepath.Join(base, res.labelsPath), func(w io.Writer) error { _, err := w.Write(firstOut); return err }); err != nil {
		return err
	}
	dir := filepath.Dir(res.labelsPath)
	res.secondPath = filepath.Join(dir, "worksheet-second-labeled.csv")
	res.adjudicatedPath = filepath.Join(dir, "adjudication.csv")
	res.doubled = len(second)
	if err := writeDemoFile(filepath.Join(base, res.secondPath), func(w io.Writer) error { _, err := w.Write(secondOut); return err }); err != nil {
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
		if v, ok := strings.CutPrefix(l, "released: "); ok && v != "" {
			return "released " + strings.Fields(v)[0]
		}
	}
	for _, l := range strings.Split(out, "\n") {
		if v, ok := strings.CutPrefix(l, "overall: "); ok && v != "" {
			return "overall " + strings.Fields(v)[0]
		}
	}
	return "no verdict printed"
}

// demoRecordSummary is what the demo repeats of the latest record's
// console: its claims by measure and the release, or else its first
// lines.
func demoRecordSummary(out string) []string {
	lines := strings.Split(strings.TrimRight(out, "\n"), "\n")
	start := slices.IndexFunc(lines, func(l string) bool { return strings.HasPrefix(l, "measures for ") })
	if start < 0 {
		return indentedLines(out, 6)[1:]
	}
	var keep []string
	for _, l := range lines[start:] {
		if strings.HasPrefix(l, "  ") || strings.HasPrefix(l, "measures for ") || strings.HasPrefix(l, "released: ") {
			keep = append(keep, l)
		}
		if strings.HasPrefix(l, "released: ") {
			break
		}
	}
	return keep
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
		for _, l := range strings.Split(out, "\n") {
			if v, ok := strings.CutPrefix(l, "measure: "); ok {
				return "charted " + strings.Fields(v)[0] + " month by month"
			}
		}
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
	sub.width = 0 // the demo reads its steps' output whole
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

// demoPartial writes the first labeler's worksheet as it stood midway:
// only the first prefix items keep their labels, as when labeling from the
// top.
func demoPartial(base, drawDir, path string, labeled []drawfolder.WorksheetRow, prefix int) error {
	f, err := openDemoDraw(base, drawDir)
	if err != nil {
		return err
	}
	rows := slices.Clone(labeled)
	for i := prefix; i < len(rows); i++ {
		rows[i].Label, rows[i].Note, rows[i].Labeler = "", "", ""
	}
	return writeDemoFile(filepath.Join(base, path), func(w io.Writer) error { return drawfolder.WriteWorksheet(w, f.Manifest.ShowColumns, rows) })
}

// openDemoDraw opens a draw folder of the demo against the demo's plan,
// as record and progress open it.
func openDemoDraw(base, drawDir string) (*drawfolder.Folder, error) {
	p, fp, err := planfile.LoadForJudging(filepath.Join(base, demoPlan))
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
