-- probity selection query (step 2 of 2), format 1, written by probity 0.1.0 for postgres.
-- plan 5d0c6f0a7b1e2d3c4b5a69788796a5b4c3d2e1f00112233445566778899aabbc, selection seed it's a \ seed.
-- counts file sha256 9f86d081884c7d659a2feaa0c55ad015a3bf4f1b2b0b822cd15d6c15b0f00a08: 3 strata, 20000 rows in scope of 20500.
-- Save the result as CSV with a header and import it with
--   probity draw --plan PLAN --counts counts.csv --selected RESULT.csv --out DIR
-- The import rebuilds this text from the result's first row; an edited
-- query gives a result whose manifest names a query that was not run.
WITH RECURSIVE
base AS (
  SELECT r.record_id,
    (r.s3 IN ('web', 'app')) AS in_scope,
    r.s1 || '|' || r.s2 AS stratum,
    CASE WHEN (strpos(r.s1, '|') > 0) THEN 'strata:region' WHEN (strpos(r.s2, '|') > 0) THEN 'strata:model_a' END AS bad,
    r.v1,
    r.v2
  FROM (
    SELECT CAST(t."record_id" AS text) AS record_id,
      COALESCE(CAST(t."region" AS text), '(null)') AS s1,
      COALESCE(CAST(t."model_a" AS text), '(null)') AS s2,
      COALESCE(CAST(t."channel" AS text), '(null)') AS s3,
      COALESCE(CAST(t."model_a" AS text), '(null)') AS v1,
      COALESCE(CAST(t."text" AS text), '(null)') AS v2
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
given (stratum, n_sample, n_spare) AS (
  VALUES
    (CAST('north|fraud' AS text), CAST(120 AS bigint), CAST(1 AS bigint)),
    (CAST('north|ok' AS text), CAST(90 AS bigint), CAST(1 AS bigint)),
    (CAST(E's''\\|fraud' AS text), CAST(2 AS bigint), CAST(0 AS bigint))
),
alloc AS (
  SELECT c.stratum, CAST(c.n_pop AS bigint) AS n_pop, CAST(COALESCE(g.n_sample, 0) AS bigint) AS n_sample,
    CAST(COALESCE(g.n_spare, 0) AS bigint) AS n_spare
  FROM counts AS c
  LEFT JOIN given AS g ON c.stratum = g.stratum
),
ranked AS (
  SELECT y.*, row_number() OVER (PARTITION BY y.stratum ORDER BY y.k) AS rnk
  FROM keyed AS y
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
    CAST(NULL AS bigint) AS stratum_rank, CAST(NULL AS text) AS key, CAST(E'{"format":1,"tool_version":"0.1.0","dialect":"postgres","plan_fingerprint":"5d0c6f0a7b1e2d3c4b5a69788796a5b4c3d2e1f00112233445566778899aabbc","seed":"it''s a \\\\ seed","period":"","selection_seed":"it''s a \\\\ seed","table":"analytics.\\"pred.log\\"","id_column":"record_id","strata":["region","model_a"],"bands":[],"where":["channel=web,app"],"show":["text"],"sample_size":212,"allocation":"measures","min_per_stratum":0,"spare":1,"double":20,"values":["model_a","text"],"counts_sha256":"9f86d081884c7d659a2feaa0c55ad015a3bf4f1b2b0b822cd15d6c15b0f00a08"}' AS text) AS detail, CAST(NULL AS text) AS v1, CAST(NULL AS text) AS v2
  UNION ALL
  SELECT 7, a.stratum, 'stratum', NULL, a.stratum, a.n_pop, a.n_sample, a.n_spare, NULL, NULL, NULL, NULL, NULL
  FROM alloc AS a
  UNION ALL
  SELECT 8, encode(r.k, 'hex'), 'item', r.record_id, r.stratum, a.n_pop, a.n_sample, a.n_spare, r.rnk, encode(r.k, 'hex'), NULL, r.v1, r.v2
  FROM ranked AS r
  JOIN alloc AS a ON a.stratum = r.stratum
  WHERE r.rnk <= a.n_sample + a.n_spare
)
SELECT kind, record_id, stratum, stratum_size, stratum_sample, stratum_spare, stratum_rank, key, detail, v1 AS value_1, v2 AS value_2
FROM out
ORDER BY sec, sk COLLATE "C";
