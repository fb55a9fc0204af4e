package sqlquery

// The SQL fragments that differ between the dialects.

// textType is the name of the text type.
func (d Dialect) textType() string {
	if d == DuckDB {
		return "VARCHAR"
	}
	return "text"
}

// text casts an expression to text, as the engine prints the value (and as
// an export of the table to CSV writes it).
func (d Dialect) text(expr string) string {
	return "CAST(" + expr + " AS " + d.textType() + ")"
}

// keyExpr is the selection key of a row: SHA-256 of the UTF-8 bytes of
// "<seed>:<record id>". seedColon is the literal of "<seed>:". PostgreSQL
// (≥ 11) gives the digest as bytea, which orders byte-wise like its hex;
// DuckDB's sha256 gives the lowercase hex directly.
func (d Dialect) keyExpr(seedColon, id string) string {
	if d == DuckDB {
		return "sha256(" + seedColon + " || " + id + ")"
	}
	return "sha256(convert_to(" + seedColon + " || " + id + ", 'UTF8'))"
}

// hex turns a key made by keyExpr into lowercase hex text.
func (d Dialect) hex(k string) string {
	if d == DuckDB {
		return k
	}
	return "encode(" + k + ", 'hex')"
}

// byteOrder is the collation clause that orders text by its bytes (the
// order the draw uses for stratum labels and keys), whatever the
// database's or session's default collation.
func (d Dialect) byteOrder() string {
	if d == DuckDB {
		return ` COLLATE "binary"`
	}
	return ` COLLATE "C"`
}

// binaryText makes a text expression compare, group and join by its bytes
// in DuckDB, where a session's default_collation (e.g. nocase) would
// otherwise merge strata or ids that differ only in case. PostgreSQL's
// default collations are deterministic (equal only when byte-equal), so
// there the expression is left as it is.
func (d Dialect) binaryText(expr string) string {
	if d == DuckDB {
		return "(" + expr + ")" + d.byteOrder()
	}
	return expr
}

// exactInt is the exact integer type the allocation computes in.
func (d Dialect) exactInt() string {
	if d == DuckDB {
		return "HUGEINT"
	}
	return "numeric"
}

// exactDiv is ⌊a / b⌋ of non-negative exact integers.
func (d Dialect) exactDiv(a, b string) string {
	if d == DuckDB {
		return "(" + a + ") // (" + b + ")"
	}
	return "div(" + a + ", " + b + ")"
}

// exactMod is a mod b of non-negative exact integers.
func (d Dialect) exactMod(a, b string) string {
	if d == DuckDB {
		return "(" + a + ") % (" + b + ")"
	}
	return "mod(" + a + ", " + b + ")"
}

// matches is a regular-expression match of a text expression against a
// pattern (written as a literal by QuoteLiteral).
func (d Dialect) matches(expr, pattern string) string {
	lit, _ := d.QuoteLiteral(pattern)
	if d == DuckDB {
		return "regexp_full_match(" + expr + ", " + lit + ")"
	}
	return "(" + expr + " ~ " + lit + ")"
}

// contains tests whether a text expression holds a literal substring
// written without single quotes.
func (d Dialect) contains(expr, sub string) string {
	return "(strpos(" + expr + ", '" + sub + "') > 0)"
}
