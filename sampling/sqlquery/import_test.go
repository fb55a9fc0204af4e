package sqlquery

import (
	"errors"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"probity/plan"
	"probity/plan/inputerr"
	"probity/sampling"
)

// badTable creates a small table from rows of (id, region, score) — NULL
// written as nil — and returns its name.
func badTable(t *testing.T, pg *pgServer, schema, name string, rows [][3]*string) string {
	t.Helper()
	table := quotePart(schema) + "." + quotePart(name)
	qt, _ := Postgres.QuoteTable(table)
	var vals []string
	for _, r := range rows {
		var f []string
		for _, v := range r {
			if v == nil {
				f = append(f, "NULL")
			} else {
				lit, _ := Postgres.QuoteLiteral(*v)
				f = append(f, lit)
			}
		}
		vals = append(vals, "("+strings.Join(f, ", ")+")")
	}
	pg.mustRun(t, "CREATE TABLE "+qt+` ("Record ""ID""" text, region text, score text, "model a" text);`+
		"INSERT INTO "+qt+` ("Record ""ID""", region, score) VALUES `+strings.Join(vals, ", ")+`; UPDATE `+qt+` SET "model a" = 'ok'`)
	return table
}

func str(s string) *string { return &s }

// manyRows makes n good rows "r1"… in regions a and b with scores.
func manyRows(n int) [][3]*string {
	var rows [][3]*string
	for i := 1; i <= n; i++ {
		region := "a"
		if i%3 == 0 {
			region = "b"
		}
		rows = append(rows, [3]*string{str("r" + strconv.Itoa(i)), str(region), str("0." + strconv.Itoa(i%10))})
	}
	return rows
}

// TestImportRefusesBadTables runs the query on tables a draw from a file
// would refuse and checks that the import refuses the result with a
// message naming the problem.
func TestImportRefusesBadTables(t *testing.T) {
	pg := needPostgres(t)
	schema := pg.schema(t)
	th := 0.5
	p := &plan.File{Format: plan.FileFormat, Seed: "s", Rule: plan.Rule{SampleSize: 10},
		Candidates: []plan.Candidate{{Name: "m", Column: "model a"}, {Name: "t", ScoreColumn: "score", Threshold: &th, Positive: "x", Negative: "ok"}}}
	with := func(rows [][3]*string, extra ...[3]*string) [][3]*string {
		return append(append([][3]*string{}, rows...), extra...)
	}
	good := manyRows(60)
	cases := []struct {
		name  string
		rows  [][3]*string
		spec  Spec
		plan  func(*plan.File)
		want  string
		isErr error
	}{
		{"NULL id", with(good, [3]*string{nil, str("a"), str("0.5")}), Spec{Strata: []string{"region"}}, nil,
			"the table has 1 row whose id is NULL or empty", nil},
		{"empty id", with(good, [3]*string{str(""), str("a"), str("0.5")}, [3]*string{str(""), str("b"), str("0.5")}), Spec{}, nil,
			"the table has 2 rows whose id is NULL or empty", nil},
		{"repeated id across strata", with(good, [3]*string{str("r7"), str("b"), str("0.1")}), Spec{Strata: []string{"region"}}, nil,
			`1 id occurs more than once in the table, e.g. "r7" (2 times)`, nil},
		{"| in a stratum value", with(good, [3]*string{str("x1"), str("a|b"), str("0.5")}), Spec{Strata: []string{"region"}}, nil,
			`column region: 1 row in scope has a value holding a |, which separates stratum values in labels (first id "x1")`, nil},
		{"band value above 1", with(good, [3]*string{str("x1"), str("a"), str("1.5")}, [3]*string{str("x2"), str("a"), str("2")}), Spec{Bands: []string{"score=0.5"}}, nil,
			`band column score: 2 rows in scope have a value that is not a number in [0, 1] (first id "x1"`, nil},
		{"band value not a number", with(good, [3]*string{str("x9"), str("a"), str("high")}), Spec{Bands: []string{"score=0.5"}}, nil,
			`band column score: 1 row in scope has a value that is not a number in [0, 1] (first id "x9"`, nil},
		{"band value NULL", with(good, [3]*string{str("x9"), str("a"), nil}), Spec{Bands: []string{"score=0.5"}}, nil,
			"NULL reads as (null)", nil},
		{"filter leaves nothing", good, Spec{Where: []string{"region=nowhere"}}, nil,
			"has no rows in scope", nil},
		{"sample larger than the table", manyRows(5), Spec{}, nil,
			"the plan needs a sample of 10 but only 5 rows are in scope", sampling.ErrSampleTooLarge},
		{"lot size differs from the plan's population", good, Spec{}, func(p *plan.File) { p.Inputs.Population = 61 },
			"60 rows of", nil},
		{"minimum beyond the sample", good, Spec{Strata: []string{"region"}, MinPerStratum: 6}, nil,
			"a minimum of 6 per stratum over 2 strata needs more than the sample's 10 items", sampling.ErrAllocation},
	}
	dir := t.TempDir()
	for i, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			table := badTable(t, pg, schema, "bad "+strconv.Itoa(i), c.rows)
			pl := *p
			if c.plan != nil {
				c.plan(&pl)
			}
			s := c.spec
			s.Format, s.ToolVersion, s.Dialect, s.Table, s.IDColumn = QueryFormat, "test", Postgres, table, `Record "ID"`
			s.PlanFingerprint, s.Seed, s.SelectionSeed, s.SampleSize, s.Candidates = "fp", pl.Seed, pl.Seed, pl.Rule.SampleSize, pl.Candidates
			if s.Allocation == "" {
				s.Allocation = "proportional"
			}
			path := filepath.Join(dir, "result-"+strconv.Itoa(i)+".csv")
			runQuery(t, pg, &s, path)
			_, err := Import(path, nil, &pl, "fp")
			var ie *inputerr.Error
			if !errors.As(err, &ie) || !strings.Contains(err.Error(), c.want) {
				t.Fatalf("Import: %v\nwant an InputError containing %q", err, c.want)
			}
			if !strings.HasPrefix(err.Error(), path) {
				t.Errorf("the message does not name the result file: %v", err)
			}
			if c.isErr != nil && !errors.Is(err, c.isErr) {
				t.Errorf("errors.Is(%v, %v) is false", err, c.isErr)
			}
		})
	}
}

// TestQueryRefusesBadSpecs checks what Query refuses before any SQL is
// written.
func TestQueryRefusesBadSpecs(t *testing.T) {
	th := 0.5
	base := Spec{Format: QueryFormat, Dialect: Postgres, Table: "t", IDColumn: "id", Seed: "s", SelectionSeed: "s", SampleSize: 5,
		Allocation: "proportional", Candidates: []plan.Candidate{{Name: "t", ScoreColumn: "score", Threshold: &th, Positive: "x", Negative: "y"}}}
	cases := []struct {
		edit func(*Spec)
		want string
	}{
		{func(s *Spec) { s.Candidates = nil }, "a sizing-only plan cannot be drawn"},
		{func(s *Spec) { s.Allocation = "neyman" }, "neyman allocation cannot run inside the engine"},
		{func(s *Spec) { s.Show = []string{"score"} }, "show score: the column holds candidate t's prediction or score"},
		{func(s *Spec) { s.Show = []string{"id"} }, "show id: the column is the id column"},
		{func(s *Spec) { s.Double = 6 }, "double 6: must be between 0 and the sample size 5"},
		{func(s *Spec) { s.Table = `"unclosed` }, "unclosed double quote"},
		{func(s *Spec) { s.Strata = []string{"a\x00b"} }, "contains a NUL byte"},
		{func(s *Spec) { s.Seed = "s\x00"; s.SelectionSeed = s.Seed }, "contains a NUL byte"},
		{func(s *Spec) { s.SelectionSeed = "other" }, "the selection seed does not follow from the seed and period"},
		{func(s *Spec) { s.Bands = []string{"score=0.9,0.5"} }, "edges must increase"},
		{func(s *Spec) { s.Dialect = "sqlite" }, `unknown SQL dialect "sqlite"`},
	}
	for i, c := range cases {
		s := base
		c.edit(&s)
		_, err := Query(&s)
		if !errors.Is(err, ErrSpec) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("case %d: %v; want ErrSpec with %q", i, err, c.want)
		}
	}
	if _, err := Query(&base); err != nil {
		t.Fatalf("the base spec is valid: %v", err)
	}
	// ClickHouse: the same checks for its counts query, and its own.
	ch := base
	ch.Dialect = ClickHouse
	chCases := append(cases[2:len(cases)-1:len(cases)-1], []struct {
		edit func(*Spec)
		want string
	}{
		{func(s *Spec) { s.Allocation = "neyman" }, "neyman allocation is not available for a clickhouse draw"},
		{func(s *Spec) { s.Table = "a.b.c" }, "ClickHouse names a table database.table"},
		{func(s *Spec) { s.Where = []string{"region=a\x00b"} }, "contains a NUL byte"},
	}...)
	for i, c := range chCases {
		s := ch
		c.edit(&s)
		_, err := CountsQuery(&s)
		if !errors.Is(err, ErrSpec) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("clickhouse case %d: %v; want ErrSpec with %q", i, err, c.want)
		}
	}
	if _, err := Query(&ch); !errors.Is(err, ErrSpec) || !strings.Contains(err.Error(), "draws in two steps") {
		t.Errorf("Query for clickhouse: %v", err)
	}
	if _, err := CountsQuery(&base); !errors.Is(err, ErrSpec) {
		t.Errorf("CountsQuery for postgres: %v", err)
	}
}
