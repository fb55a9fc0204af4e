package sqlquery

import (
	"strconv"
	"strings"

	"probity/sampling"
)

// Allocation rules the query can compute. Neyman allocation is not among
// them: its weights N_h·√(p_h(1−p_h)) are floating-point numbers that the
// Go draw divides in exact rational arithmetic, which SQL engines cannot
// reproduce bit for bit; it is refused rather than approximated.
const (
	ruleProportional = "proportional"
	ruleEqual        = "equal"
)

// allocationCTEs returns the CTEs that turn counts(stratum, n_pop) into
// alloc(stratum, n_pop, n_sample, n_spare), computing exactly what
// sampling.Allocate computes:
//
//   - every stratum not pinned gets a share m·w_h/W of what is left, m, with
//     w_h = N_h (proportional) or 1 (equal) and W the sum of w over those
//     strata; a stratum whose share reaches N_h is taken whole and the rest
//     divided again among the others, until no share reaches its stratum;
//   - the shares are rounded by largest remainder: ⌊share⌋ each, and the
//     units left over to the largest remainders, ties by label in ascending
//     byte order;
//   - with a minimum k per stratum, every stratum whose rounded allocation is
//     below min(k, N_h) is pinned at min(k, N_h), and the division starts
//     again from scratch with m = n − Σ pinned, until no stratum is below
//     its minimum.
//
// Each step of that procedure is one round of a recursive CTE (alloc_steps);
// all arithmetic is on exact integers (numeric or HUGEINT), since every
// comparison of shares reduces to one of products m·w_h, N_h·W.
func allocationCTEs(s *Spec) (string, error) {
	d := s.Dialect
	var w string
	switch s.Allocation {
	case ruleProportional, "":
		w = "n_pop"
	case ruleEqual:
		w = "1"
	default:
		return "", specError("allocation", "%q cannot be computed in SQL (only proportional and equal can)", s.Allocation)
	}
	if s.SampleSize < 1 || s.MinPerStratum < 0 || s.Spare < 0 {
		return "", specError("", "sample size %d, minimum %d, spares %d", s.SampleSize, s.MinPerStratum, s.Spare)
	}
	if s.roundingName() == sampling.RoundUp {
		return roundUpCTEs(s), nil
	}
	num := d.exactInt()
	n := "CAST(" + strconv.Itoa(s.SampleSize) + " AS " + num + ")"
	k := "CAST(" + strconv.Itoa(s.MinPerStratum) + " AS " + num + ")"
	spare := "CAST(" + strconv.Itoa(s.Spare) + " AS " + num + ")"
	// The round limit only guards against a loop that cannot happen: each
	// round pins or takes whole at least one more stratum.
	r := strings.NewReplacer(
		"$NUM", num, "$N", n, "$K", k, "$W", w, "$SPARE", spare,
		"$C", d.byteOrder(),
		"$DIV_FL", d.exactDiv("num_share", "w_sum"),
		"$MOD_REM", d.exactMod("num_share", "w_sum"),
	)
	return r.Replace(`alloc_steps AS (
  SELECT 0 AS it, stratum, CAST(n_pop AS $NUM) AS n_pop, CAST($W AS $NUM) AS w,
    CAST(-1 AS $NUM) AS pinned, false AS whole, false AS done, CAST(0 AS $NUM) AS n_sample
  FROM counts
  UNION ALL
  SELECT it + 1, stratum, n_pop, w,
    CASE WHEN new_pin THEN LEAST($K, n_pop) ELSE pinned END,
    CASE WHEN any_whole THEN whole OR new_whole WHEN any_pin THEN false ELSE whole END,
    NOT any_whole AND NOT any_pin,
    n_alloc
  FROM (
    SELECT z4.*, bool_or(new_pin) OVER () AS any_pin
    FROM (
      SELECT z3.*, NOT any_whole AND active AND n_alloc < LEAST($K, n_pop) AS new_pin
      FROM (
        SELECT z2.*,
          CASE WHEN pinned >= 0 THEN pinned WHEN whole THEN n_pop
            ELSE fl + CASE WHEN rk <= m - fl_sum THEN 1 ELSE 0 END END AS n_alloc
        FROM (
          SELECT z1.*, bool_or(new_whole) OVER () AS any_whole,
            sum(CASE WHEN active THEN fl ELSE 0 END) OVER () AS fl_sum,
            row_number() OVER (PARTITION BY active ORDER BY rem DESC, stratum$C) AS rk
          FROM (
            SELECT z0.*,
              active AND w_sum > 0 AND num_share >= n_pop * w_sum AS new_whole,
              CASE WHEN active AND w_sum > 0 THEN $DIV_FL ELSE 0 END AS fl,
              CASE WHEN active AND w_sum > 0 THEN $MOD_REM ELSE 0 END AS rem
            FROM (
              SELECT y.*, m * w AS num_share
              FROM (
                SELECT x.*,
                  $N - sum(CASE WHEN pinned >= 0 THEN pinned WHEN whole THEN n_pop ELSE 0 END) OVER () AS m,
                  sum(CASE WHEN pinned < 0 AND NOT whole THEN w ELSE 0 END) OVER () AS w_sum,
                  pinned < 0 AND NOT whole AS active
                FROM alloc_steps AS x
                WHERE NOT x.done AND x.it < 4 * (SELECT count(*) FROM counts) + 4
              ) AS y
            ) AS z0
          ) AS z1
        ) AS z2
      ) AS z3
    ) AS z4
  ) AS z5
),
alloc AS (
  SELECT stratum, CAST(n_pop AS bigint) AS n_pop, CAST(n_sample AS bigint) AS n_sample,
    CAST(LEAST($SPARE, n_pop - n_sample) AS bigint) AS n_spare
  FROM alloc_steps
  WHERE done
),
`), nil
}

// roundingName is the rounding the allocation uses: sampling.RoundUp for a
// proportional allocation that asks for it, else "" (largest remainder).
func (s *Spec) roundingName() string {
	if (s.Allocation == ruleProportional || s.Allocation == "") && s.Rounding == sampling.RoundUp {
		return sampling.RoundUp
	}
	return ""
}

// roundUpCTEs is the allocation CTE of proportional shares rounded up, as
// sampling.Allocate computes it: n_h = min(N_h, max(⌈n·N_h/N⌉, k)), with
// ⌈a/b⌉ = ⌊(a + b − 1)/b⌋ on exact integers.
func roundUpCTEs(s *Spec) string {
	d := s.Dialect
	num := d.exactInt()
	n := "CAST(" + strconv.Itoa(s.SampleSize) + " AS " + num + ")"
	k := "CAST(" + strconv.Itoa(s.MinPerStratum) + " AS " + num + ")"
	spare := "CAST(" + strconv.Itoa(s.Spare) + " AS " + num + ")"
	share := d.exactDiv(n+" * CAST(n_pop AS "+num+") + t.total - 1", "t.total")
	return `alloc_up AS (
  SELECT stratum, CAST(n_pop AS ` + num + `) AS n_pop,
    LEAST(CAST(n_pop AS ` + num + `), GREATEST(` + share + `, ` + k + `)) AS n_sample
  FROM counts, (SELECT CAST(sum(n_pop) AS ` + num + `) AS total FROM counts) AS t
),
alloc AS (
  SELECT stratum, CAST(n_pop AS bigint) AS n_pop, CAST(n_sample AS bigint) AS n_sample,
    CAST(LEAST(` + spare + `, n_pop - n_sample) AS bigint) AS n_spare
  FROM alloc_up
),
`
}

// givenAllocationCTEs is the allocation of a two-step draw's selection
// query (PostgreSQL, DuckDB): n_h and spares as probity computed them from
// the counts file, written as literals, joined to the strata counted
// again, so that alloc(stratum, n_pop, n_sample, n_spare) holds the
// recount (a stratum the counts file lacks gets no rows, and the import
// refuses it).
func givenAllocationCTEs(d Dialect, counts *Counts) (string, error) {
	var b strings.Builder
	b.WriteString("given (stratum, n_sample, n_spare) AS (\n  VALUES")
	for i, a := range counts.Strata {
		lit, err := d.QuoteLiteral(a.Label)
		if err != nil {
			return "", specError("", "stratum %q: %w", a.Label, err)
		}
		if i > 0 {
			b.WriteString(",")
		}
		b.WriteString("\n    (CAST(" + lit + " AS " + d.textType() + "), CAST(" + strconv.Itoa(a.Sample) + " AS bigint), CAST(" + strconv.Itoa(a.Spare) + " AS bigint))")
	}
	b.WriteString("\n),\n")
	b.WriteString(`alloc AS (
  SELECT c.stratum, CAST(c.n_pop AS bigint) AS n_pop, CAST(COALESCE(g.n_sample, 0) AS bigint) AS n_sample,
    CAST(COALESCE(g.n_spare, 0) AS bigint) AS n_spare
  FROM counts AS c
  LEFT JOIN given AS g ON c.stratum = ` + d.binaryText("g.stratum") + `
),
`)
	return b.String(), nil
}
