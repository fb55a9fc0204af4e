-- probity draw query, format 1, written by probity 0.1.0 for postgres.
-- plan 5d0c6f0a7b1e2d3c4b5a69788796a5b4c3d2e1f00112233445566778899aabbc, selection seed it's a \ seed.
-- Save the result as CSV with a header and import it with
--   probity draw --plan PLAN --selected RESULT.csv --out DIR
-- The import rebuilds this text from the result's first row; an edited
-- query gives a result whose manifest names a query that was not run.
WITH RECURSIVE
base AS (
  SELECT r.record_id,
    (r.s3 IN ('web', 'app')) AS in_scope,
    r.s1 || '|' || r.s2 || '|' || CASE WHEN r.b1 >= 0 AND r.b1 <= 1 THEN CASE WHEN r.b1 < CAST('0.5' AS double precision) THEN '[0,0.5)' WHEN r.b1 < CAST('0.9' AS double precision) THEN '[0.5,0.9)' ELSE '[0.9,1]' END END AS stratum,
    CASE WHEN (strpos(r.s1, '|') > 0) THEN 'strata:region' WHEN (strpos(r.s2, '|') > 0) THEN 'strata:select' WHEN r.b1 IS NULL OR NOT (r.b1 >= 0 AND r.b1 <= 1) THEN 'band:score' END AS bad,
    r.v1,
    r.v2,
    r.v3
  FROM (
    SELECT CAST(t."record_id" AS text) AS record_id,
      COALESCE(CAST(t."region" AS text), '(null)') AS s1,
      COALESCE(CAST(t."select" AS text), '(null)') AS s2,
      COALESCE(CAST(t."channel" AS text), '(null)') AS s3,
      CASE WHEN (COALESCE(CAST(t."score" AS text), '(null)') ~ E'^ *[+-]?([0-9]+(\\.[0-9]*)?|\\.[0-9]+)([eE][+-]?[0-9]+)? *$') THEN CAST(trim(COALESCE(CAST(t."score" AS text), '(null)')) AS double precision) END AS b1,
      COALESCE(CAST(t."model_a" AS text), '(null)') AS v1,
      COALESCE(CAST(t."score" AS text), '(null)') AS v2,
      COALESCE(CAST(t."text" AS text), '(null)') AS v3
    FROM "analytics"."pred.log" AS t
    OFFSET 0
  ) AS r
),
src AS (
  SELECT * FROM base WHERE in_scope
),
keyed AS (
  SELECT s.*, sha256(convert_to(E'it''s a \\ seed:' || s.record_id, 'UTF8')) AS k
  FROM src AS s
),
counts AS (
  SELECT stratum, count(*) AS n_pop
  FROM src
  GROUP BY stratum
),
alloc_steps AS (
  SELECT 0 AS it, stratum, CAST(n_pop AS numeric) AS n_pop, CAST(n_pop AS numeric) AS w,
    CAST(-1 AS numeric) AS pinned, false AS whole, false AS done, CAST(0 AS numeric) AS n_sample
  FROM counts
  UNION ALL
  SELECT it + 1, stratum, n_pop, w,
    CASE WHEN new_pin THEN LEAST(CAST(3 AS numeric), n_pop) ELSE pinned END,
    CASE WHEN any_whole THEN whole OR new_whole WHEN any_pin THEN false ELSE whole END,
    NOT any_whole AND NOT any_pin,
    n_alloc
  FROM (
    SELECT z4.*, bool_or(new_pin) OVER () AS any_pin
    FROM (
      SELECT z3.*, NOT any_whole AND active AND n_alloc < LEAST(CAST(3 AS numeric), n_pop) AS new_pin
      FROM (
        SELECT z2.*,
          CASE WHEN pinned >= 0 THEN pinned WHEN whole THEN n_pop
            ELSE fl + CASE WHEN rk <= m - fl_sum THEN 1 ELSE 0 END END AS n_alloc
        FROM (
          SELECT z1.*, bool_or(new_whole) OVER () AS any_whole,
            sum(CASE WHEN active THEN fl ELSE 0 END) OVER () AS fl_sum,
            row_number() OVER (PARTITION BY active ORDER BY rem DESC, stratum COLLATE "C") AS rk
          FROM (
            SELECT z0.*,
              active AND w_sum > 0 AND num_share >= n_pop * w_sum AS new_whole,
              CASE WHEN active AND w_sum > 0 THEN div(num_share, w_sum) ELSE 0 END AS fl,
              CASE WHEN active AND w_sum > 0 THEN mod(num_share, w_sum) ELSE 0 END AS rem
            FROM (
              SELECT y.*, m * w AS num_share
              FROM (
                SELECT x.*,
                  CAST(581 AS numeric) - sum(CASE WHEN pinned >= 0 THEN pinned WHEN whole THEN n_pop ELSE 0 END) OVER () AS m,
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
    CAST(LEAST(CAST(2 AS numeric), n_pop - n_sample) AS bigint) AS n_spare
  FROM alloc_steps
  WHERE done
),
ranked AS (
  SELECT y.*, row_number() OVER (PARTITION BY y.stratum ORDER BY y.k) AS rnk
  FROM keyed AS y
),
dups AS (
  SELECT record_id, count(*) AS n
  FROM src
  WHERE record_id <> ''
  GROUP BY record_id
  HAVING count(*) > 1
),
bads AS (
  SELECT bad, count(*) AS n, min(record_id COLLATE "C") AS first_id
  FROM src
  WHERE bad IS NOT NULL
  GROUP BY bad
),
tally AS (
  SELECT count(*) AS n_all, sum(CASE WHEN in_scope THEN 1 ELSE 0 END) AS n_scope,
    sum(CASE WHEN record_id IS NULL OR record_id = '' THEN 1 ELSE 0 END) AS n_empty
  FROM base
),
out AS (
  SELECT 1 AS sec, CAST(NULL AS text) AS sk, 'draw' AS kind, CAST(NULL AS text) AS record_id, CAST(NULL AS text) AS stratum,
    CAST((SELECT n_all FROM tally) AS bigint) AS stratum_size,
    CAST((SELECT COALESCE(sum(n_sample), 0) FROM alloc) AS bigint) AS stratum_sample,
    CAST((SELECT COALESCE(sum(n_spare), 0) FROM alloc) AS bigint) AS stratum_spare,
    CAST(NULL AS bigint) AS stratum_rank, CAST(NULL AS text) AS key, CAST(E'{"format":1,"tool_version":"0.1.0","dialect":"postgres","plan_fingerprint":"5d0c6f0a7b1e2d3c4b5a69788796a5b4c3d2e1f00112233445566778899aabbc","seed":"it''s a \\\\ seed","period":"","selection_seed":"it''s a \\\\ seed","table":"analytics.\\"pred.log\\"","id_column":"record_id","strata":["region","select"],"bands":["score=0.5,0.9"],"where":["channel=web,app"],"show":["text"],"sample_size":581,"allocation":"proportional","min_per_stratum":3,"spare":2,"double":20,"values":["model_a","score","text"]}' AS text) AS detail, CAST(NULL AS text) AS v1, CAST(NULL AS text) AS v2, CAST(NULL AS text) AS v3
  UNION ALL
  SELECT 2, NULL, 'in_scope', NULL, NULL, CAST(COALESCE((SELECT n_scope FROM tally), 0) AS bigint), NULL, NULL, NULL, NULL, NULL, NULL, NULL, NULL
  UNION ALL
  SELECT 3, NULL, 'empty_ids', NULL, NULL, CAST(COALESCE((SELECT n_empty FROM tally), 0) AS bigint), NULL, NULL, NULL, NULL, NULL, NULL, NULL, NULL
  UNION ALL
  SELECT 4, NULL, 'duplicate_ids', NULL, NULL, (SELECT count(*) FROM dups), NULL, NULL, NULL, NULL, NULL, NULL, NULL, NULL
  UNION ALL
  SELECT 5, e.record_id, 'duplicate_id', e.record_id, NULL, e.n, NULL, NULL, NULL, NULL, NULL, NULL, NULL, NULL
  FROM (SELECT record_id, n FROM dups ORDER BY record_id COLLATE "C" LIMIT 3) AS e
  UNION ALL
  SELECT 6, x.bad, 'bad_value', x.first_id, NULL, x.n, NULL, NULL, NULL, NULL, x.bad, NULL, NULL, NULL
  FROM bads AS x
  UNION ALL
  SELECT 7, a.stratum, 'stratum', NULL, a.stratum, a.n_pop, a.n_sample, a.n_spare, NULL, NULL, NULL, NULL, NULL, NULL
  FROM alloc AS a
  UNION ALL
  SELECT 8, encode(r.k, 'hex'), 'item', r.record_id, r.stratum, a.n_pop, a.n_sample, a.n_spare, r.rnk, encode(r.k, 'hex'), NULL, r.v1, r.v2, r.v3
  FROM ranked AS r
  JOIN alloc AS a ON a.stratum = r.stratum
  WHERE r.rnk <= a.n_sample + a.n_spare
)
SELECT kind, record_id, stratum, stratum_size, stratum_sample, stratum_spare, stratum_rank, key, detail, v1 AS value_1, v2 AS value_2, v3 AS value_3
FROM out
ORDER BY sec, sk COLLATE "C";
