package main

import (
	"fmt"
	"io"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"probity/plan"
	"probity/plan/inputerr"
	"probity/sampling"
	"probity/sampling/drawfolder"
	"probity/sampling/safewrite"
	"probity/sampling/sqlquery"
)

// drawSQLOptions are the flags that make draw work with a database: print
// the query (--sql with --table) or import its result (--selected); for a
// dialect that draws in two steps (clickhouse), --counts names the result
// of the first query.
type drawSQLOptions struct {
	dialect  string
	table    string
	selected string
	counts   string
}

// drawSQLHelp is added to draw's long help.
const drawSQLHelp = `

Drawing inside a database. With --sql postgres|duckdb --table NAME, draw
prints one SQL query instead of reading a log. Run it where the table lives
and save its result as CSV with a header, e.g.
  psql --csv -f draw.sql > result.csv
then
  probity draw --plan PLAN.yaml --selected result.csv --out DIR
checks every key against its id and seed, the allocation against the
stratum counts and the result against the plan, and writes the usual folder;
its manifest names the engine, the table and the query's SHA-256. The query
computes the same keys, counts and allocation (proportional or equal, with
--min-per-stratum and --spare) as a draw from a file. NAME is taken exactly as
written (schema.table; write "a.b" for a name holding a dot); names are always
quoted and the seed is a literal the query cannot break out of. A NULL value
is read as the text (null), so NULL strata form their own stratum "(null)";
a NULL or empty id, or an id on more than one row, is refused. An export of
the table written with NULL '(null)', e.g.
  COPY t TO STDOUT (FORMAT csv, HEADER, NULL '(null)')
gives the same worksheet and ledger with --log, and
probity draw --check DIR --log EXPORT verifies a draw made in the engine.

ClickHouse draws in two steps (it has no window functions). With --sql
clickhouse --table NAME, draw prints the counts query; run it with
  clickhouse-client < counts.sql > counts.csv
then draw --plan PLAN.yaml --sql clickhouse --counts counts.csv allocates the
sample from those counts (as a draw from a file does; the other settings come
from counts.csv) and prints the selection query; run it the same way and
import its result with --counts counts.csv --selected selected.csv --out DIR.
The import checks the selection against the counts (the table counted again
must give the same strata) and the manifest records the counts file's
SHA-256. Both queries end with FORMAT CSVWithNames, which writes ids exactly.
Never set skip_unavailable_shards (the queries pin it to 0): a shard that does
not answer must fail the query, not drop its rows.

A plan with measures draws in the same two steps in every dialect: its
strata are the user's crossed with the candidates' predictions (as in a draw
from a file), and its design is sized again on the counted strata, which
only probity can do. --sql postgres --table NAME then prints the counts
query; --sql postgres --counts counts.csv the selection query, which holds
each stratum's n_h; --counts counts.csv --selected selected.csv --out DIR
imports it, and the manifest holds the same measures block as a draw from
a file.`

// hookDrawSQL adds --sql, --table and --selected to the draw command and
// routes the command to the SQL paths when they are given; otherwise the
// draw from a log runs unchanged.
func hookDrawSQL(d deps, cmd *cobra.Command, o *drawOptions) {
	so := &drawSQLOptions{}
	fl := cmd.Flags()
	fl.StringVar(&so.dialect, "sql", "", "print the query that draws inside a database instead, for `DIALECT` postgres, duckdb or clickhouse")
	fl.StringVar(&so.table, "table", "", "with --sql: the table or view to draw from (`NAME` or schema.name)")
	fl.StringVar(&so.selected, "selected", "", "import the drawing query's result `FILE` (CSV; - for stdin) into the folder --out")
	fl.StringVar(&so.counts, "counts", "", "with --sql clickhouse: print the selection query for the counts query's result `FILE`; with --selected: the counts it was made from")
	cmd.Long = strings.Replace(cmd.Long, "\n\n"+drawExitHelp, drawSQLHelp+"\n\n"+drawExitHelp, 1)
	cmd.Example += `
  probity draw --plan plan.yaml --sql postgres --table analytics.predictions \
      --strata region --show text > draw.sql
  probity draw --plan plan.yaml --selected result.csv --out audit-2026-11
  probity draw --plan plan.yaml --sql clickhouse --table logs.predictions \
      --strata region > counts.sql
  probity draw --plan plan.yaml --sql clickhouse --counts counts.csv > selection.sql
  probity draw --plan plan.yaml --counts counts.csv --selected selected.csv --out audit-2026-11`
	pre, run := cmd.PreRunE, cmd.RunE
	cmd.PreRunE = func(c *cobra.Command, args []string) error {
		o.minPerSet = c.Flags().Changed("min-per-stratum")
		o.allocationSet, o.roundingSet = c.Flags().Changed("allocation"), c.Flags().Changed("rounding")
		if so.dialect == "" && so.selected == "" {
			if so.table != "" {
				return inputerr.Errorf("--table is only used with --sql").WithHint("add --sql postgres, duckdb or clickhouse to print the drawing query")
			}
			if so.counts != "" {
				return inputerr.Errorf("--counts is only used with --sql clickhouse or --selected").
					WithHint("print the selection query with --sql clickhouse --counts FILE, or import its result with --counts FILE --selected RESULT")
			}
			return pre(c, args)
		}
		return so.validate(c, o)
	}
	cmd.RunE = func(c *cobra.Command, args []string) error {
		switch {
		case so.dialect != "":
			return runDrawSQL(d, c, o, so)
		case so.selected != "":
			return runDrawSelected(d, c, o, so)
		case o.check != "" && isEngineDraw(o.check):
			return runDrawCheckEngine(d, o)
		}
		return run(c, args)
	}
}

// validate checks the flags of the two SQL paths.
func (so *drawSQLOptions) validate(c *cobra.Command, o *drawOptions) error {
	if so.dialect != "" && so.selected != "" {
		return inputerr.Errorf("--sql and --selected cannot be used together").WithHint("--sql prints the query; --selected imports its result")
	}
	if o.planPath == "" {
		return inputerr.Errorf("--plan is required").WithHint("give the plan file made by 'probity plan', e.g. --plan plan.yaml")
	}
	mode := "--sql"
	refused := []string{"log", "check", "format", "dedupe", "anticipated", "time-column", "days"}
	if so.dialect != "" {
		refused = append(refused, "out", "force")
	} else {
		mode = "--selected"
	}
	for _, name := range refused {
		if c.Flags().Changed(name) {
			return inputerr.Errorf("--%s cannot be used with %s", name, mode).WithHint(drawSQLConflictHint(name, mode))
		}
	}
	if err := checkPeriodFlag(o.period); err != nil {
		return err
	}
	if so.selected != "" {
		if o.out == "" {
			return inputerr.Errorf("--out is required").WithHint("name the folder to write the draw into, e.g. --out audit-2026-11")
		}
		if so.selected == "-" && so.counts == "-" {
			return inputerr.Errorf("--counts and --selected cannot both read stdin")
		}
		return nil
	}
	if _, err := sqlquery.ParseDialect(so.dialect); err != nil {
		return inputerr.Errorf("--sql: %v", err).WithHint("e.g. --sql postgres")
	}
	if so.table == "" && so.counts == "" {
		return inputerr.Errorf("--sql needs --table").WithHint("name the table or view holding the prediction log, e.g. --table analytics.predictions")
	}
	if o.allocation == sampling.Neyman {
		return inputerr.Errorf("--allocation neyman cannot run inside the engine").WithHint("use proportional or equal with --sql, or export the table and draw with --log")
	}
	return nil
}

// drawSQLConflictHint explains why a flag does not go with --sql or
// --selected.
func drawSQLConflictHint(name, mode string) string {
	switch {
	case name == "log" || name == "format":
		return "the query reads the table, not a log; to draw from an export, drop " + mode
	case name == "check":
		return "check a draw made in the engine with probity draw --check DIR --plan PLAN --log EXPORT"
	case name == "dedupe":
		return "a draw inside the engine refuses repeated ids; remove them in a view, or draw from an export with --dedupe first"
	case name == "anticipated":
		return "neyman allocation cannot run inside the engine"
	case name == "time-column" || name == "days":
		return "the days without rows are counted from a log file; draw from an export with --log to check them"
	default:
		return "--sql prints the query to stdout; the folder is written by --selected RESULT --out DIR"
	}
}

// drawSpec builds the query's specification from the flags.
func drawSpec(d deps, o *drawOptions, so *drawSQLOptions, planPath string) (*sqlquery.Spec, error) {
	p, fp, err := loadDrawPlan(planPath)
	if err != nil {
		return nil, err
	}
	if err := refuseTimeColumnInEngine(p, planPath); err != nil {
		return nil, err
	}
	if err := refuseStratifiedSequential(p, o); err != nil {
		return nil, err
	}
	if err := o.planDesign(p); err != nil {
		return nil, err
	}
	// Inside the engine the minimum is what --min-per-stratum says: the
	// default of one per stratum is left to the rounding (proportional
	// shares rounded up give every stratum an item; equal shares do when
	// the sample has room), since the query cannot know the strata first.
	minPer := 0
	if o.minPerSet {
		minPer = o.minPer
	}
	rounding := ""
	if o.allocation == sampling.Proportional {
		rounding = o.rounding
	}
	var bands []sampling.Band
	for _, b := range o.bands {
		pb, err := sampling.ParseBand(b)
		if err != nil {
			return nil, inputerr.Errorf("--band: %v", err).WithHint("e.g. --band score=0.5,0.9")
		}
		bands = append(bands, pb)
	}
	strata, bands, rule, err := sqlStrata(o, p, bands)
	if err != nil {
		return nil, err
	}
	if rule == sampling.Measures {
		minPer, rounding = 0, ""
	}
	s := &sqlquery.Spec{
		Format: sqlquery.QueryFormat, ToolVersion: d.version, Dialect: sqlquery.Dialect(so.dialect),
		PlanFingerprint: fp, Seed: p.Seed, Period: o.period, SelectionSeed: p.Seed,
		Table: so.table, IDColumn: o.id, Strata: strata, Show: o.show,
		Candidates: p.Candidates, SampleSize: sqlquery.SampleSize(p),
		Allocation: rule, MinPerStratum: minPer, Spare: o.spare, Double: o.double, Rounding: rounding,
	}
	if o.period != "" {
		s.SelectionSeed = sampling.PeriodSeed(p.Seed, o.period)
	}
	for _, b := range bands {
		s.Bands = append(s.Bands, b.String())
	}
	for _, w := range o.where {
		pf, err := sampling.ParseFilter(w)
		if err != nil {
			return nil, inputerr.Errorf("--where: %v", err).WithHint("e.g. --where region=north,south")
		}
		s.Where = append(s.Where, pf.String())
	}
	return s, nil
}

// sqlStrata returns the strata columns, bands and allocation rule of a
// draw inside a database: the flags', and for a plan with measures the
// plan's prediction strata after them, added as the draw from a file adds
// them (addDrawMeasures).
func sqlStrata(o *drawOptions, p *plan.File, bands []sampling.Band) ([]string, []sampling.Band, string, error) {
	in := sampling.DrawInput{Plan: p, StrataColumns: append([]string(nil), o.strata...), Bands: bands, Alloc: sampling.AllocOptions{Rule: o.allocation}}
	if err := addDrawMeasures(o, &in); err != nil {
		return nil, nil, "", err
	}
	return in.StrataColumns, in.Bands, in.Alloc.Rule, nil
}

// sqlFlags names the flag of each setting of a query's Spec, by its JSON
// key.
var sqlFlags = map[string]string{
	"table": "--table", "id_column": "--id", "bands": "--band", "where": "--where", "show": "--show",
	"double": "--double", "spare": "--spare", "min_per_stratum": "--min-per-stratum", "allocation": "--allocation",
}

// runDrawSQL prints the drawing query (for clickhouse, the counts query,
// or with --counts the selection query).
func runDrawSQL(d deps, c *cobra.Command, o *drawOptions, so *drawSQLOptions) error {
	if so.counts != "" {
		return runDrawSelectionSQL(d, c, o, so)
	}
	s, err := drawSpec(d, o, so, o.planPath)
	if err != nil {
		return err
	}
	if s.TwoStep() {
		return printCountsQuery(d, o, s)
	}
	q, err := sqlquery.Query(s)
	if err != nil {
		return flagNames(err, sqlFlags)
	}
	if _, err := io.WriteString(d.stdout, q); err != nil {
		return err
	}
	if !o.quiet {
		fmt.Fprintf(d.stderr, "probity: query for %s on %s, sha256 %s\n", s.Dialect, s.Table, drawfolder.SHA256Hex([]byte(q)))
		fmt.Fprintf(d.stderr, "probity: run it, save the result as CSV with a header, then: probity draw --plan %s --selected RESULT.csv --out DIR\n", o.planPath)
	}
	return nil
}

// printCountsQuery prints the first query of a two-step draw.
func printCountsQuery(d deps, o *drawOptions, s *sqlquery.Spec) error {
	q, err := sqlquery.CountsQuery(s)
	if err != nil {
		return flagNames(err, sqlFlags)
	}
	if _, err := io.WriteString(d.stdout, q); err != nil {
		return err
	}
	noteQuerySize(d, s.Dialect, q)
	if !o.quiet {
		fmt.Fprintf(d.stderr, "probity: counts query (step 1 of 2) for %s on %s, sha256 %s\n", s.Dialect, s.Table, drawfolder.SHA256Hex([]byte(q)))
		fmt.Fprintf(d.stderr, "probity: run it, save the result as CSV with a header, then: probity draw --plan %s --sql %s --counts COUNTS.csv > selection.sql\n", o.planPath, s.Dialect)
	}
	return nil
}

// noteQuerySize warns when a ClickHouse query is longer than the server
// parses by default.
func noteQuerySize(d deps, dialect sqlquery.Dialect, q string) {
	if dialect == sqlquery.ClickHouse && len(q) > sqlquery.ClickHouseMaxQuerySize {
		fmt.Fprintf(d.stderr, "probity: the query is %d bytes, more than ClickHouse parses by default (max_query_size %d)\nhint: run it with clickhouse-client --max_query_size=%d\n",
			len(q), sqlquery.ClickHouseMaxQuerySize, len(q)+1)
	}
}

// runDrawSelectionSQL reads the counts query's result, allocates the
// sample and prints the selection query.
func runDrawSelectionSQL(d deps, c *cobra.Command, o *drawOptions, so *drawSQLOptions) error {
	p, fp, err := loadDrawPlan(o.planPath)
	if err != nil {
		return err
	}
	if dialect := sqlquery.Dialect(so.dialect); !dialect.TwoStep() && p.Measures == nil {
		return inputerr.Errorf("--counts cannot be used with --sql %s", dialect).
			WithHint("--sql " + string(dialect) + " prints one query that counts and selects; --counts is for --sql clickhouse, or for a plan with measures")
	}
	counts, err := sqlquery.ReadCounts(so.counts, d.stdin, p, fp)
	if err != nil {
		return drawError(err)
	}
	if err := checkResultFlags(so.counts, c, o, so, p, counts.Spec); err != nil {
		return err
	}
	q, err := sqlquery.SelectionQuery(counts)
	if err != nil {
		return flagNames(err, sqlFlags)
	}
	if _, err := io.WriteString(d.stdout, q); err != nil {
		return err
	}
	noteQuerySize(d, counts.Spec.Dialect, q)
	if !o.quiet {
		n, spares := 0, 0
		for _, a := range counts.Strata {
			n, spares = n+a.Sample, spares+a.Spare
		}
		fmt.Fprintf(d.stderr, "probity: selection query (step 2 of 2) for %s on %s, sha256 %s: %d items and %d spares from %d strata (%d rows in scope)\n",
			counts.Spec.Dialect, counts.Spec.Table, drawfolder.SHA256Hex([]byte(q)), n, spares, len(counts.Strata), counts.InScope)
		fmt.Fprintf(d.stderr, "probity: run it, save the result as CSV with a header, then: probity draw --plan %s --counts %s --selected RESULT.csv --out DIR\n", o.planPath, so.counts)
	}
	return nil
}

// refuseTimeColumnInEngine refuses a plan that declares a time column for
// a draw inside a database: the days without rows are counted from a log
// file, and a plan that asks for them must not be drawn without.
func refuseTimeColumnInEngine(p *plan.File, planPath string) error {
	if p.TimeColumn == "" {
		return nil
	}
	return inputerr.Errorf("%s declares the time column %s, whose days without rows a draw inside a database does not count", planPath, p.TimeColumn).
		WithHint("export the table and draw from the log file with --log")
}

// runDrawSelected imports a query's result into the draw folder (with
// --counts, a two-step selection checked against its counts).
func runDrawSelected(d deps, c *cobra.Command, o *drawOptions, so *drawSQLOptions) error {
	p, fp, err := loadDrawPlan(o.planPath)
	if err != nil {
		return err
	}
	if err := refuseTimeColumnInEngine(p, o.planPath); err != nil {
		return err
	}
	if err := safewrite.CheckFolder(o.out, o.force); err != nil {
		return drawError(err)
	}
	var res *sqlquery.Result
	if so.counts != "" {
		counts, err := sqlquery.ReadCounts(so.counts, d.stdin, p, fp)
		if err != nil {
			return drawError(err)
		}
		if res, err = sqlquery.ImportSelection(so.selected, d.stdin, p, fp, counts); err != nil {
			return drawError(err)
		}
	} else if res, err = sqlquery.Import(so.selected, d.stdin, p, fp); err != nil {
		return drawError(err)
	}
	if err := checkResultFlags(so.selected, c, o, so, p, res.Spec); err != nil {
		return err
	}
	drawn, err := drawTime(d, o, p)
	if err != nil {
		return err
	}
	f, err := res.Folder(d.version)
	if err != nil {
		return drawError(err)
	}
	f.Manifest.Drawn = &drawn
	if err := drawfolder.Write(o.out, f, safewrite.FolderOptions{Replace: o.force, Protected: []string{o.planPath, so.selected, so.counts}}); err != nil {
		return drawError(err)
	}
	writeDrawSummary(d.stdout, o.out, f)
	fmt.Fprintf(d.stdout, "drawn inside %s from table %s (the log above is the query's result); query sha256 %s\n", res.Spec.Dialect, res.Spec.Table, res.QuerySHA256)
	if res.Counts != nil {
		fmt.Fprintf(d.stdout, "allocated from the counts in %s (sha256 %s)\n", res.Counts.Path, res.Counts.SHA256)
	}
	return writeDrawRule(d.stdout, p, f.Manifest)
}

// checkResultFlags refuses a draw setting given with --selected (or with
// --counts) that differs from the one the result file was made with: the
// result carries its settings, and a differing flag means the wrong result
// or the wrong command line.
func checkResultFlags(file string, c *cobra.Command, o *drawOptions, so *drawSQLOptions, p *plan.File, s *sqlquery.Spec) error {
	var parsed []sampling.Band
	bands := make([]string, len(o.bands))
	for i, b := range o.bands {
		pb, err := sampling.ParseBand(b)
		if err != nil {
			bands[i] = b
			continue
		}
		parsed = append(parsed, pb)
	}
	strata := o.strata
	rule := o.allocation
	if len(parsed) == len(o.bands) {
		// for a plan with measures, the flags' strata and bands with the
		// prediction strata after them, as the query was printed
		var err error
		if strata, parsed, rule, err = sqlStrata(o, p, parsed); err != nil {
			return err
		}
		bands = make([]string, len(parsed))
		for i, b := range parsed {
			bands[i] = b.String()
		}
	}
	where := make([]string, len(o.where))
	for i, w := range o.where {
		if pf, err := sampling.ParseFilter(w); err == nil {
			where[i] = pf.String()
		} else {
			where[i] = w
		}
	}
	checks := []struct {
		flag      string
		given, in string
	}{
		{"sql", so.dialect, string(s.Dialect)},
		{"table", so.table, s.Table},
		{"id", o.id, s.IDColumn},
		{"strata", strings.Join(strata, ","), strings.Join(s.Strata, ",")},
		{"band", strings.Join(bands, " "), strings.Join(s.Bands, " ")},
		{"where", strings.Join(where, " "), strings.Join(s.Where, " ")},
		{"show", strings.Join(o.show, ","), strings.Join(s.Show, ",")},
		{"allocation", rule, s.Allocation},
		{"min-per-stratum", strconv.Itoa(o.minPer), strconv.Itoa(s.MinPerStratum)},
		{"rounding", o.rounding, s.Rounding},
		{"spare", strconv.Itoa(o.spare), strconv.Itoa(s.Spare)},
		{"double", strconv.Itoa(o.double), strconv.Itoa(s.Double)},
		{"period", o.period, s.Period},
	}
	for _, ch := range checks {
		if c.Flags().Changed(ch.flag) && ch.given != ch.in {
			return inputerr.Errorf("%s: --%s %q differs from the draw the result was made for (%q)", file, ch.flag, ch.given, ch.in).WithHint("the result carries the draw's settings; drop the flag, or import the result of the query printed with these settings")
		}
	}
	return nil
}

// isEngineDraw reports whether the draw folder dir was made inside a
// database (its manifest names an engine).
func isEngineDraw(dir string) bool {
	m, _, err := drawfolder.ReadManifest(filepath.Join(dir, drawfolder.ManifestFile))
	return err == nil && m.Engine != nil
}

// runDrawCheckEngine is draw --check for a folder drawn inside a database,
// against an export of the table: the draw is recomputed from the export
// and compared item by item, stratum by stratum. The manifest's log digest
// and size describe the query's result file, which an export cannot
// reproduce, so they are taken from the folder; everything else must match.
func runDrawCheckEngine(d deps, o *drawOptions) error {
	p, fp, err := loadDrawPlan(o.planPath)
	if err != nil {
		return err
	}
	mpath := filepath.Join(o.check, drawfolder.ManifestFile)
	m, _, err := drawfolder.ReadManifest(mpath)
	if err != nil {
		return err
	}
	in, err := sampling.DrawInputFromManifest(m)
	if err != nil {
		return inputerr.InFile(err, mpath)
	}
	in.Format = ""
	in.Plan, in.PlanFingerprint, in.LogPath, in.ToolVersion, in.MaxLine = p, fp, o.logPath, d.version, o.parsedMaxLine
	f, err := drawFromLog(d, o, &in)
	if err != nil {
		return inputerr.InFile(err, mpath)
	}
	exportSHA, exportBytes := f.Manifest.Log.SHA256, f.Manifest.Log.Bytes
	f.Manifest.Log.SHA256, f.Manifest.Log.Bytes = m.Log.SHA256, m.Log.Bytes
	f.Manifest.Log.ContentSHA256 = m.Log.ContentSHA256
	rep, err := drawfolder.Compare(o.check, f)
	if err != nil {
		return err
	}
	if len(rep.Differences) == 0 {
		fmt.Fprintf(d.stdout, "same: %s, drawn inside %s from table %s, holds exactly the %d items and %d spares that the seed picks from %s (%d rows, sha256 %s, %d bytes)\n",
			o.check, m.Engine.Dialect, m.Engine.Table, rep.Items, rep.Spares, o.logPath, f.Manifest.Log.Rows, exportSHA, exportBytes)
		return nil
	}
	fmt.Fprintf(d.stdout, "different: %s, drawn inside %s from table %s, is not what the seed picks from %s:\n", o.check, m.Engine.Dialect, m.Engine.Table, o.logPath)
	for _, s := range rep.Differences {
		fmt.Fprintf(d.stdout, "  %s\n", s)
	}
	return rejected("draw check failed: %s", countOf(len(rep.Differences), "difference", "differences"))
}
