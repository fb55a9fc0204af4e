-- probity counts query (step 1 of 2), format 1, written by probity 0.1.0 for postgres.
-- plan 5d0c6f0a7b1e2d3c4b5a69788796a5b4c3d2e1f00112233445566778899aabbc, selection seed it's a \ seed.
-- Save the result as CSV with a header and print the selection query with
--   probity draw --plan PLAN --sql postgres --counts counts.csv > selection.sql
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
counts AS (
  SELECT stratum, count(*) AS n_pop
  FROM src
  GROUP BY stratum
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
  SELECT 1 AS sec, CAST(NULL AS text) AS sk, 'counts' AS kind, CAST(NULL AS text) AS record_id, CAST(NULL AS text) AS stratum,
    CAST((SELECT n_all FROM tally) AS bigint) AS stratum_size,
    CAST(NULL AS bigint) AS stratum_sample, CAST(NULL AS bigint) AS stratum_spare,
    CAST(NULL AS bigint) AS stratum_rank, CAST(NULL AS text) AS key, CAST(E'{"format":1,"tool_version":"0.1.0","dialect":"postgres","plan_fingerprint":"5d0c6f0a7b1e2d3c4b5a69788796a5b4c3d2e1f00112233445566778899aabbc","seed":"it''s a \\\\ seed","period":"","selection_seed":"it''s a \\\\ seed","table":"analytics.\\"pred.log\\"","id_column":"record_id","strata":["region","model_a"],"bands":[],"where":["channel=web,app"],"show":["text"],"sample_size":212,"allocation":"measures","min_per_stratum":0,"spare":1,"double":20,"values":["model_a","text"]}' AS text) AS detail, CAST(NULL AS text) AS v1, CAST(NULL AS text) AS v2
  UNION ALL
  SELECT 2, NULL, 'in_scope', NULL, NULL, CAST(COALESCE((SELECT n_scope FROM tally), 0) AS bigint), NULL, NULL, NULL, NULL, NULL, NULL, NULL
  UNION ALL
  SELECT 3, NULL, 'empty_ids', NULL, NULL, CAST(COALESCE((SELECT n_empty FROM tally), 0) AS bigint), NULL, NULL, NULL, NULL, NULL, NULL, NULL
  UNION ALL
  SELECT 4, NULL, 'duplicate_ids', NULL, NULL, (SELECT count(*) FROM dups), NULL, NULL, NULL, NULL, NULL, NULL, NULL
  UNION ALL
  SELECT 5, e.record_id, 'duplicate_id', e.record_id, NULL, e.n, NULL, NULL, NULL, NULL, NULL, NULL, NULL
  FROM (SELECT record_id, n FROM dups ORDER BY record_id COLLATE "C" LIMIT 3) AS e
  UNION ALL
  SELECT 6, x.bad, 'bad_value', x.first_id, NULL, x.n, NULL, NULL, NULL, NULL, x.bad, NULL, NULL
  FROM bads AS x
  UNION ALL
  SELECT 7, c.stratum, 'stratum', NULL, c.stratum, c.n_pop, NULL, NULL, NULL, NULL, NULL, NULL, NULL
  FROM counts AS c
)
SELECT kind, record_id, stratum, stratum_size, stratum_sample, stratum_spare, stratum_rank, key, detail, v1 AS value_1, v2 AS value_2
FROM out
ORDER BY sec, sk COLLATE "C";
