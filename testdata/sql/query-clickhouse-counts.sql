-- probity counts query (step 1 of 2), format 1, written by probity 0.1.0 for clickhouse.
-- plan 5d0c6f0a7b1e2d3c4b5a69788796a5b4c3d2e1f00112233445566778899aabbc, selection seed it's a \ seed.
-- Save the result with its header, e.g.
--   clickhouse-client < counts.sql > counts.csv
-- then print the selection query with
--   probity draw --plan PLAN --sql clickhouse --counts counts.csv > selection.sql
-- Every aggregate is merged across shards (distributed_group_by_no_merge = 0).
SELECT kind, record_id, stratum, stratum_size, stratum_sample, stratum_spare, stratum_rank, key, detail, value_1, value_2, value_3
FROM (
  SELECT probity_row.1 AS sec, '' AS sk, '' AS sk2, probity_row.2 AS kind, '' AS record_id, '' AS stratum, toString(probity_row.3) AS stratum_size,
    '' AS stratum_sample, '' AS stratum_spare, '' AS stratum_rank, '' AS key, if(probity_row.1 = 1, '{"format":1,"tool_version":"0.1.0","dialect":"clickhouse","plan_fingerprint":"5d0c6f0a7b1e2d3c4b5a69788796a5b4c3d2e1f00112233445566778899aabbc","seed":"it\'s a \\\\ seed","period":"","selection_seed":"it\'s a \\\\ seed","table":"analytics.\\"pred.log\\"","id_column":"record_id","strata":["region","select"],"bands":["score=0.5,0.9"],"where":["channel=web,app"],"show":["text"],"sample_size":581,"allocation":"proportional","min_per_stratum":3,"spare":2,"double":20,"values":["model_a","score","text"]}', '') AS detail, '' AS value_1, '' AS value_2, '' AS value_3
  FROM (
    WITH
      ifNull(toString(t."record_id"), '') AS probity_id,
      ifNull(toString(t."channel"), '(null)') AS probity_s3,
      probity_s3 IN ('web', 'app') AS probity_in_scope
    SELECT [tuple(1, 'counts', toInt64(count())), tuple(2, 'in_scope', toInt64(countIf(probity_in_scope))), tuple(3, 'empty_ids', toInt64(countIf(probity_id = ''))),
      tuple(4, 'repeated_rows', toInt64(countIf(probity_in_scope AND probity_id != '')) - toInt64(uniqExactIf(probity_id, probity_in_scope AND probity_id != '')))] AS probity_rows
    FROM "analytics"."pred.log" AS t
  )
  ARRAY JOIN probity_rows AS probity_row
  UNION ALL
  SELECT if(probity_bad = '', 6, 5), if(probity_bad = '', probity_stratum, probity_bad), probity_stratum, if(probity_bad = '', 'stratum', 'bad_value'), probity_first_id,
    if(probity_bad = '', probity_stratum, ''), toString(probity_n), '', '', '', '', probity_bad, '', '', ''
  FROM (
    WITH
      ifNull(toString(t."record_id"), '') AS probity_id,
      ifNull(toString(t."region"), '(null)') AS probity_s1,
      ifNull(toString(t."select"), '(null)') AS probity_s2,
      ifNull(toString(t."channel"), '(null)') AS probity_s3,
      '^[\\x{9}-\\x{D}\\x{20}\\x{85}\\x{A0}\\x{1680}\\x{2000}-\\x{200A}\\x{2028}-\\x{2029}\\x{202F}\\x{205F}\\x{3000}]*([+-]?)([0-9]*)(\\.([0-9]*))?([eE]([+-]?)0*([0-9]{1,9}))?[\\x{9}-\\x{D}\\x{20}\\x{85}\\x{A0}\\x{1680}\\x{2000}-\\x{200A}\\x{2028}-\\x{2029}\\x{202F}\\x{205F}\\x{3000}]*$' AS probity_score_pattern,
      ifNull(toString(t."score"), '(null)') AS probity_b1_text,
      match(probity_b1_text, probity_score_pattern) AS probity_b1_ok,
      splitByChar('|', replaceRegexpOne(probity_b1_text, probity_score_pattern, '\\1|\\2|\\4|\\6|\\7')) AS probity_b1_parts,
      probity_b1_parts[1] AS probity_b1_sign,
      concat(probity_b1_parts[2], probity_b1_parts[3]) AS probity_b1_digits,
      replaceRegexpOne(replaceRegexpOne(probity_b1_digits, '^0+', ''), '0+$', '') AS probity_b1_d,
      toInt64(length(probity_b1_parts[2])) - (toInt64(length(probity_b1_digits)) - toInt64(length(replaceRegexpOne(probity_b1_digits, '^0+', '')))) + if(probity_b1_parts[4] = '-', -1, 1) * toInt64OrZero(probity_b1_parts[5]) AS probity_b1_p,
      probity_b1_ok AND probity_b1_digits != '' AND if(probity_b1_sign = '-', NOT (probity_b1_d != '' AND (probity_b1_p > -323 OR (probity_b1_p = -323 AND probity_b1_d > '24703282292062327208828439643411068618252990130716238221279284125033775363510437593264991818081799618989828234772285886546332835517796989819938739800539093906315035659515570226392290858392449105184435931802849936536152500319370457678249219365623669863658480757001585769269903706311928279558551332927834338409351978015531246597263579574622766465272827220056374006485499977096599470454020828166226237857393450736339007967761930577506740176324673600968951340535537458516661134223766678604162159680461914467291840300530057530849048765391711386591646239524912623653881879636239373280423891018672348497668235089863388587925628302755995657524455507255189313690836254779186948667994968324049705821028513185451396213837722826145437693412532098591327667236328125'))), NOT (probity_b1_d != '' AND (probity_b1_p > 1 OR (probity_b1_p = 1 AND probity_b1_d > '100000000000000011102230246251565404236316680908203125')))) AS probity_b1_in_range,
      probity_s3 IN ('web', 'app') AS probity_in_scope,
      concat(probity_s1, '|', probity_s2, '|', multiIf(NOT probity_b1_in_range, '', probity_b1_sign != '-' AND (probity_b1_d != '' AND (probity_b1_p > 0 OR (probity_b1_p = 0 AND probity_b1_d > '899999999999999966693309261245303787291049957275390625'))), '[0.9,1]', probity_b1_sign != '-' AND ((probity_b1_d != '' AND (probity_b1_p > 0 OR (probity_b1_p = 0 AND probity_b1_d > '4999999999999999722444243843710864894092082977294921875'))) OR (probity_b1_p = 0 AND probity_b1_d = '4999999999999999722444243843710864894092082977294921875')), '[0.5,0.9)', '[0,0.5)')) AS probity_stratum,
      multiIf(position(probity_s1, '|') > 0, 'strata:region', position(probity_s2, '|') > 0, 'strata:select', NOT probity_b1_in_range, 'band:score', '') AS probity_bad
    SELECT probity_stratum, probity_bad, count() AS probity_n, minIf(probity_id, probity_bad != '') AS probity_first_id
    FROM "analytics"."pred.log" AS t
    WHERE probity_in_scope
    GROUP BY probity_stratum, probity_bad
  )
)
ORDER BY sec, sk, sk2
SETTINGS distributed_group_by_no_merge = 0, skip_unavailable_shards = 0, extremes = 0, read_overflow_mode = 'throw', group_by_overflow_mode = 'throw', sort_overflow_mode = 'throw', result_overflow_mode = 'throw', timeout_overflow_mode = 'throw', set_overflow_mode = 'throw'
FORMAT CSVWithNames
