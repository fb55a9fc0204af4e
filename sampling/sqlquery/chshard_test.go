package sqlquery

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"probity/sampling/sqlquery/chcluster"
)

// TestClickHouseShardStopped checks that a draw never yields a partial
// sample: a table that changed between the two queries is refused at the
// import; a shard stopped while the selection query runs, or before it,
// makes the query fail and leaves nothing the import accepts; and the
// counts query fails too without the shard.
func TestClickHouseShardStopped(t *testing.T) {
	c := chcluster.Start(t)
	cols := make([]string, len(chColumns))
	for i, col := range chColumns {
		q, _ := ClickHouse.QuoteIdent(col)
		cols[i] = q + " " + chTypes[i]
	}
	// Shard 2 serves its rows through a view that sleeps half a
	// millisecond a row, so that a query is still running there when it is
	// stopped.
	rows := chInventedLog(2000)
	for i, s := range c.Shards {
		where := ""
		if i == 1 {
			where = " WHERE sleepEachRow(0.0005) = 0"
		}
		_, load := chWriteLog(rows[i*1000 : (i+1)*1000])
		for _, q := range []string{"CREATE TABLE default.data (" + strings.Join(cols, ", ") + ") ENGINE = MergeTree ORDER BY tuple()",
			"CREATE VIEW default.slow_local AS SELECT * FROM default.data" + where} {
			if _, err := s.Query(q, nil); err != nil {
				t.Fatal(err)
			}
		}
		if _, err := s.Query("INSERT INTO default.data FORMAT CSV", bytes.NewReader(load), "--format_csv_allow_single_quotes=0"); err != nil {
			t.Fatal(err)
		}
	}
	c.MustQuery(t, "CREATE TABLE default.slow AS default.data ENGINE = Distributed("+chcluster.Name+", default, slow_local, rand())", nil)

	p := e2ePlan(60)
	s := &Spec{Format: QueryFormat, ToolVersion: "test", Dialect: ClickHouse, PlanFingerprint: "f00d", Seed: p.Seed, SelectionSeed: p.Seed,
		Table: "default.slow", IDColumn: chColumns[0], Strata: []string{"select"}, Candidates: p.Candidates, SampleSize: 60, Allocation: "proportional", Spare: 1}
	dir := t.TempDir()
	counts := func() *Counts {
		t.Helper()
		q, err := CountsQuery(s)
		if err != nil {
			t.Fatal(err)
		}
		path := filepath.Join(dir, "counts.csv")
		if err := os.WriteFile(path, c.MustQuery(t, q, nil), 0o644); err != nil {
			t.Fatal(err)
		}
		counts, err := ReadCounts(path, nil, p, "f00d")
		if err != nil {
			t.Fatal(err)
		}
		return counts
	}
	// importOutput imports what a selection query wrote to stdout.
	importOutput := func(out []byte, counts *Counts) error {
		path := filepath.Join(dir, "selected.csv")
		if err := os.WriteFile(path, out, 0o644); err != nil {
			t.Fatal(err)
		}
		_, err := ImportSelection(path, nil, p, "f00d", counts)
		return err
	}

	t.Run("table changed between the queries", func(t *testing.T) {
		before := counts()
		_, load := chWriteLog(chInventedLog(2001)[2000:])
		if _, err := c.Shards[0].Query("INSERT INTO default.data FORMAT CSV", bytes.NewReader(load), "--format_csv_allow_single_quotes=0"); err != nil {
			t.Fatal(err)
		}
		q, err := SelectionQuery(before)
		if err != nil {
			t.Fatal(err)
		}
		err = importOutput(c.MustQuery(t, q, nil), before)
		if err == nil || !strings.Contains(err.Error(), "but the counts query read") {
			t.Errorf("the import of a selection from a grown table: %v", err)
		}
	})

	// last is the counts of the table as it is once it stops changing.
	var last *Counts
	t.Run("shard stopped during the selection query", func(t *testing.T) {
		last = counts()
		q, err := SelectionQuery(last)
		if err != nil {
			t.Fatal(err)
		}
		cmd := c.Shards[0].Command()
		cmd.Stdin = strings.NewReader(q)
		var out, errb bytes.Buffer
		cmd.Stdout, cmd.Stderr = &out, &errb
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		exited := make(chan error, 1)
		go func() { exited <- cmd.Wait() }()
		t.Cleanup(func() { _ = cmd.Process.Kill() })
		// Wait until shard 2 runs a part of the query (a query the initiator
		// sent it), then stop it.
		deadline := time.Now().Add(60 * time.Second)
		for {
			n, err := c.Shards[1].Query("SELECT count() FROM system.processes WHERE is_initial_query = 0", nil)
			if err == nil && strings.TrimSpace(string(n)) != "0" {
				break
			}
			select {
			case err := <-exited:
				t.Fatalf("the selection query ended (%v) before shard 2 was seen running it:\n%s", err, errb.String())
			default:
			}
			if time.Now().After(deadline) {
				t.Fatal("shard 2 never ran the selection query")
			}
			time.Sleep(20 * time.Millisecond)
		}
		if err := c.Shards[1].Kill(); err != nil {
			t.Fatal(err)
		}
		if err := <-exited; err == nil {
			t.Fatalf("the selection query succeeded with a shard stopped midway:\n%s", out.String())
		}
		t.Logf("clickhouse-client: %s", strings.TrimSpace(errb.String()))
		if err := importOutput(out.Bytes(), last); err == nil {
			t.Error("the import accepted the output of a query that failed")
		}
	})

	t.Run("shard stopped before the queries", func(t *testing.T) {
		if last == nil || c.Shards[1].Running() {
			t.Skip("runs after the shard was stopped")
		}
		cq, _ := CountsQuery(s)
		if out, err := c.Query(cq, nil); err == nil {
			t.Errorf("the counts query succeeded without shard 2:\n%s", out)
		}
		q, err := SelectionQuery(last)
		if err != nil {
			t.Fatal(err)
		}
		out, err := c.Query(q, nil)
		if err == nil {
			t.Fatalf("the selection query succeeded without shard 2:\n%s", out)
		}
		if err := importOutput(out, last); err == nil {
			t.Error("the import accepted the output of a query that failed")
		}
	})
}

// TestQuotingInClickHouse checks that every nasty string survives as a
// literal, as a column alias and as a table and column name in a real
// server (ClickHouse reads backslash escapes in both).
func TestQuotingInClickHouse(t *testing.T) {
	c := chcluster.Start(t)
	for i, s := range nastyStrings {
		lit, err := ClickHouse.QuoteLiteral(s)
		if err != nil {
			t.Fatal(err)
		}
		id, err := ClickHouse.QuoteIdent(s)
		if err != nil {
			t.Fatal(err)
		}
		out := c.MustQuery(t, "SELECT hex("+lit+") AS "+id+" FORMAT CSVWithNames", nil)
		want := csvQuote(s) + "\n" + csvQuote(strings.ToUpper(hexOf(s))) + "\n"
		if string(out) != want {
			t.Errorf("case %d: %q came back as\n%s", i, s, out)
		}
		table := "default." + quotePart(s)
		qt, err := ClickHouse.QuoteTable(table)
		if err != nil {
			t.Fatalf("QuoteTable(%q): %v", table, err)
		}
		c.MustQuery(t, "CREATE TABLE "+qt+" ("+id+" UInt8) ENGINE = Memory", nil)
		out = c.MustQuery(t, "SELECT name FROM system.columns WHERE database = 'default' AND table = "+lit+" FORMAT CSV", nil)
		if string(out) != csvQuote(s)+"\n" {
			t.Errorf("case %d: the column of table %q came back as %q", i, s, out)
		}
	}
}
