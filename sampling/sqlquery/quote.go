package sqlquery

import (
	"errors"
	"fmt"
	"strings"
	"unicode/utf8"
)

// ErrName is wrapped by every error about an identifier (a table or column
// name) that cannot be written safely into a query.
var ErrName = errors.New("invalid SQL name")

// ErrLiteral is wrapped by every error about a string that cannot be
// written as a SQL literal.
var ErrLiteral = errors.New("invalid SQL literal")

// QuoteIdent returns name as a delimited identifier: wrapped in double
// quotes with every double quote doubled (SQL:2016 Part 2 §5.2 <delimited
// identifier>, as in both PostgreSQL and DuckDB). ClickHouse reads
// backslash escapes inside quoted identifiers (\n, \x41, \\), so there
// every backslash and double quote is escaped with a backslash instead. The
// name is taken exactly as written — case, spaces and keywords included —
// since a delimited identifier is never folded. A name that is empty, not
// UTF-8, holds a NUL byte or is longer than the dialect keeps is refused.
func (d Dialect) QuoteIdent(name string) (string, error) {
	switch {
	case name == "":
		return "", fmt.Errorf("%w: the name is empty", ErrName)
	case !utf8.ValidString(name):
		return "", fmt.Errorf("%w: %q is not valid UTF-8", ErrName, name)
	case strings.IndexByte(name, 0) >= 0:
		return "", fmt.Errorf("%w: %q contains a NUL byte", ErrName, name)
	}
	if max := d.maxIdentBytes(); max > 0 && len(name) > max {
		return "", fmt.Errorf("%w: %q is %d bytes long; %s keeps only the first %d", ErrName, name, len(name), d, max)
	}
	if d == ClickHouse {
		return `"` + backslashEscaper('"').Replace(name) + `"`, nil
	}
	return `"` + strings.ReplaceAll(name, `"`, `""`) + `"`, nil
}

// backslashEscaper escapes backslashes and the quote character q with a
// backslash, as ClickHouse reads quoted strings and identifiers.
func backslashEscaper(q byte) *strings.Replacer {
	return strings.NewReplacer(`\`, `\\`, string(q), `\`+string(q))
}

// QuoteLiteral returns s as a string literal the query cannot break out of.
// Single quotes are doubled. For PostgreSQL a string holding a backslash is
// written as an escape string E'…' with every backslash doubled as well, so
// it reads the same whatever standard_conforming_strings is set to (the
// rule of PostgreSQL's own quote_literal). DuckDB treats backslashes in
// ordinary literals as plain characters. ClickHouse reads backslash escapes
// in every literal, so there each backslash and single quote is escaped
// with a backslash ('it\'s a \\ seed'). A string that is not UTF-8 or
// holds a NUL byte (which no text value can) is refused.
func (d Dialect) QuoteLiteral(s string) (string, error) {
	switch {
	case !utf8.ValidString(s):
		return "", fmt.Errorf("%w: %q is not valid UTF-8", ErrLiteral, s)
	case strings.IndexByte(s, 0) >= 0:
		return "", fmt.Errorf("%w: %q contains a NUL byte", ErrLiteral, s)
	}
	if d == ClickHouse {
		return `'` + backslashEscaper('\'').Replace(s) + `'`, nil
	}
	q := strings.ReplaceAll(s, `'`, `''`)
	if d == Postgres && strings.Contains(s, `\`) {
		return `E'` + strings.ReplaceAll(q, `\`, `\\`) + `'`, nil
	}
	return `'` + q + `'`, nil
}

// ParseTableName splits a table reference into its parts: "predictions",
// "analytics.predictions" or "lake.analytics.predictions". A part is either
// bare — taken exactly as written, spaces and case included, and ending at
// the next dot — or double-quoted with "" standing for one quote, for a name
// that itself holds a dot or a quote: `"odd.name"`, `"say ""hi"""`. At most
// three parts (catalog, schema, table).
func ParseTableName(s string) ([]string, error) {
	var parts []string
	i := 0
	for {
		var part strings.Builder
		if i < len(s) && s[i] == '"' {
			i++
			closed := false
			for i < len(s) {
				if s[i] == '"' {
					if i+1 < len(s) && s[i+1] == '"' {
						part.WriteByte('"')
						i += 2
						continue
					}
					i++
					closed = true
					break
				}
				part.WriteByte(s[i])
				i++
			}
			if !closed {
				return nil, fmt.Errorf("%w: table name %q has an unclosed double quote", ErrName, s)
			}
			if i < len(s) && s[i] != '.' {
				return nil, fmt.Errorf("%w: table name %q: a quoted part must be followed by a dot or the end", ErrName, s)
			}
		} else {
			for i < len(s) && s[i] != '.' {
				if s[i] == '"' {
					return nil, fmt.Errorf("%w: table name %q: a double quote inside a bare part; quote the whole part and double the quote", ErrName, s)
				}
				part.WriteByte(s[i])
				i++
			}
		}
		if part.Len() == 0 {
			return nil, fmt.Errorf("%w: table name %q has an empty part", ErrName, s)
		}
		parts = append(parts, part.String())
		if i >= len(s) {
			break
		}
		i++ // the dot
		if i >= len(s) {
			return nil, fmt.Errorf("%w: table name %q ends with a dot", ErrName, s)
		}
	}
	if len(parts) > 3 {
		return nil, fmt.Errorf("%w: table name %q has %d parts; at most catalog.schema.table", ErrName, s, len(parts))
	}
	return parts, nil
}

// QuoteTable returns the table reference s (see ParseTableName) with each
// part quoted by QuoteIdent. ClickHouse names a table with at most two
// parts, database.table.
func (d Dialect) QuoteTable(s string) (string, error) {
	parts, err := ParseTableName(s)
	if err != nil {
		return "", err
	}
	if d == ClickHouse && len(parts) > 2 {
		return "", fmt.Errorf("%w: table name %q has %d parts; ClickHouse names a table database.table", ErrName, s, len(parts))
	}
	quoted := make([]string, len(parts))
	for i, p := range parts {
		q, err := d.QuoteIdent(p)
		if err != nil {
			return "", err
		}
		quoted[i] = q
	}
	return strings.Join(quoted, "."), nil
}
