package sqlquery

import (
	"errors"
	"strings"
	"testing"
)

// nastyStrings are strings a user may put in a seed, a table or a column
// name: quotes of both kinds, backslashes (which an escape string reads
// differently), SQL keywords, comment and statement terminators, dollar
// quotes and non-ASCII text. Common practice, no source.
var nastyStrings = []string{
	`plain`,
	`it's`,
	`''`,
	`'); DROP TABLE t; --`,
	`a"b`,
	`""`,
	`back\slash`,
	`\'`,
	`trailing\`,
	`select`,
	`Order By`,
	`with space`,
	`$$`,
	`$tag$ x $tag$`,
	`/* not a comment */`,
	"tab\there\nnewline",
	`étiquette ✓`,
}

func TestQuoteIdent(t *testing.T) {
	cases := []struct {
		in, want string
	}{ // common practice, no source: SQL delimited identifiers
		{`score`, `"score"`},
		{`Score`, `"Score"`},
		{`a"b`, `"a""b"`},
		{`select`, `"select"`},
		{`with space`, `"with space"`},
	}
	for _, c := range cases {
		got, err := Postgres.QuoteIdent(c.in)
		if err != nil || got != c.want {
			t.Errorf("QuoteIdent(%q) = %q, %v; want %q", c.in, got, err, c.want)
		}
	}
	for _, bad := range []string{"", "a\x00b", "\xff", strings.Repeat("x", 64)} {
		if _, err := Postgres.QuoteIdent(bad); !errors.Is(err, ErrName) {
			t.Errorf("QuoteIdent(%q): err = %v, want ErrName", bad, err)
		}
	}
	if _, err := DuckDB.QuoteIdent(strings.Repeat("x", 64)); err != nil {
		t.Errorf("duckdb keeps long names: %v", err)
	}
	for in, want := range map[string]string{`score`: `"score"`, `a"b`: `"a\"b"`, `a\b`: `"a\\b"`, `\"`: `"\\\""`} {
		if got, err := ClickHouse.QuoteIdent(in); err != nil || got != want {
			t.Errorf("clickhouse QuoteIdent(%q) = %q, %v; want %q", in, got, err, want)
		}
	}
	if _, err := ClickHouse.QuoteTable("a.b.c"); !errors.Is(err, ErrName) {
		t.Errorf("clickhouse QuoteTable of three parts: %v", err)
	}
}

func TestQuoteLiteral(t *testing.T) {
	cases := []struct {
		d       Dialect
		in, out string
	}{ // the rule of PostgreSQL's quote_literal (PostgreSQL 15 manual §9.4)
		{Postgres, `abc`, `'abc'`},
		{Postgres, `it's`, `'it''s'`},
		{Postgres, `a\b`, `E'a\\b'`},
		{Postgres, `\'`, `E'\\'''`},
		{DuckDB, `a\b`, `'a\b'`},
		{DuckDB, `it's`, `'it''s'`},
		// ClickHouse reads backslash escapes in every literal (its SQL
		// reference, "String literals").
		{ClickHouse, `it's`, `'it\'s'`},
		{ClickHouse, `a\b`, `'a\\b'`},
		{ClickHouse, `\'`, `'\\\''`},
		{ClickHouse, `\x41\n`, `'\\x41\\n'`},
	}
	for _, c := range cases {
		got, err := c.d.QuoteLiteral(c.in)
		if err != nil || got != c.out {
			t.Errorf("%s QuoteLiteral(%q) = %q, %v; want %q", c.d, c.in, got, err, c.out)
		}
	}
	for _, bad := range []string{"a\x00", "\xc3"} {
		if _, err := Postgres.QuoteLiteral(bad); !errors.Is(err, ErrLiteral) {
			t.Errorf("QuoteLiteral(%q): err = %v, want ErrLiteral", bad, err)
		}
	}
}

func TestParseTableName(t *testing.T) {
	cases := []struct {
		in   string
		want []string
	}{ // our own syntax (see ParseTableName)
		{`predictions`, []string{"predictions"}},
		{`analytics.predictions`, []string{"analytics", "predictions"}},
		{`lake.analytics.Preds`, []string{"lake", "analytics", "Preds"}},
		{`"odd.name"`, []string{"odd.name"}},
		{`s."say ""hi"""`, []string{"s", `say "hi"`}},
		{`my table`, []string{"my table"}},
		{`"a".b`, []string{"a", "b"}},
	}
	for _, c := range cases {
		got, err := ParseTableName(c.in)
		if err != nil || strings.Join(got, "\x00") != strings.Join(c.want, "\x00") {
			t.Errorf("ParseTableName(%q) = %q, %v; want %q", c.in, got, err, c.want)
		}
	}
	for _, bad := range []string{``, `.`, `a.`, `.a`, `a..b`, `"open`, `"a"b`, `a"b`, `a.b.c.d`, `""`} {
		if _, err := ParseTableName(bad); !errors.Is(err, ErrName) {
			t.Errorf("ParseTableName(%q): err = %v, want ErrName", bad, err)
		}
	}
}

// TestQuotingInPostgres checks that every nasty string survives as a
// literal and as a table and column name in a real server, with
// standard_conforming_strings both on and off.
func TestQuotingInPostgres(t *testing.T) {
	pg := needPostgres(t)
	schema := pg.schema(t)
	qs, _ := Postgres.QuoteIdent(schema)
	for _, scs := range []string{"on", "off"} {
		for _, s := range nastyStrings {
			lit, err := Postgres.QuoteLiteral(s)
			if err != nil {
				t.Fatal(err)
			}
			out := pg.mustRun(t, "SET standard_conforming_strings = "+scs+"; SET escape_string_warning = off; SELECT encode(convert_to("+lit+", 'UTF8'), 'hex')", "-A", "-t")
			if got := strings.TrimSpace(string(out)); got != hexOf(s) {
				t.Errorf("scs=%s literal %q read back as hex %s", scs, s, got)
			}
		}
	}
	for i, s := range nastyStrings {
		id, err := Postgres.QuoteIdent(s)
		if err != nil {
			t.Fatal(err)
		}
		table := schema + "." + quotePart(s)
		qt, err := Postgres.QuoteTable(table)
		if err != nil {
			t.Fatalf("QuoteTable(%q): %v", table, err)
		}
		pg.mustRun(t, "CREATE TABLE "+qt+" ("+id+" integer); INSERT INTO "+qt+" VALUES (1)")
		// The table and its one column share the name s.
		out := pg.mustRun(t, "SELECT attname FROM pg_attribute WHERE attrelid = '"+strings.ReplaceAll(qs+"."+id, "'", "''")+"'::regclass AND attnum = 1", "-A", "-t")
		if got := strings.TrimSuffix(string(out), "\n"); got != s {
			t.Errorf("case %d: column name %q came back as %q", i, s, got)
		}
	}
}

// quotePart writes one table-name part in ParseTableName's syntax.
func quotePart(s string) string {
	return `"` + strings.ReplaceAll(s, `"`, `""`) + `"`
}

func hexOf(s string) string {
	const digits = "0123456789abcdef"
	b := make([]byte, 0, 2*len(s))
	for i := 0; i < len(s); i++ {
		b = append(b, digits[s[i]>>4], digits[s[i]&15])
	}
	return string(b)
}
