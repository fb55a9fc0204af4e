-- probity selection query (step 2 of 2), format 1, written by probity 0.1.0 for clickhouse.
-- plan 5d0c6f0a7b1e2d3c4b5a69788796a5b4c3d2e1f00112233445566778899aabbc, selection seed it's a \ seed.
-- counts file sha256 9f86d081884c7d659a2feaa0c55ad015a3bf4f1b2b0b822cd15d6c15b0f00a08: 3 strata, 20000 rows in scope of 20500.
-- Save the result with its header, e.g.
--   clickhouse-client < selection.sql > selected.csv
-- and import it with
--   probity draw --plan PLAN --counts counts.csv --selected selected.csv --out DIR
SELECT kind, record_id, stratum, stratum_size, stratum_sample, stratum_spare, stratum_rank, key, detail, value_1, value_2, value_3
FROM (
  SELECT 1 AS sec, '' AS sk, '' AS sk2, 'draw' AS kind, '' AS record_id, '' AS stratum, toString(sum(probity_n)) AS stratum_size,
    '577' AS stratum_sample, '4' AS stratum_spare, '' AS stratum_rank, '' AS key, '{"format":1,"tool_version":"0.1.0","dialect":"clickhouse","plan_fingerprint":"5d0c6f0a7b1e2d3c4b5a69788796a5b4c3d2e1f00112233445566778899aabbc","seed":"it\'s a \\\\ seed","period":"","selection_seed":"it\'s a \\\\ seed","table":"analytics.\\"pred.log\\"","id_column":"record_id","strata":["region","select"],"bands":["score=0.5,0.9"],"where":["channel=web,app"],"show":["text"],"sample_size":581,"allocation":"proportional","min_per_stratum":3,"spare":2,"double":20,"values":["model_a","score","text"],"counts_sha256":"9f86d081884c7d659a2feaa0c55ad015a3bf4f1b2b0b822cd15d6c15b0f00a08"}' AS detail, '' AS value_1, '' AS value_2, '' AS value_3
  FROM (
    SELECT count() AS probity_n
    FROM "analytics"."pred.log" AS t
  )
  UNION ALL
  SELECT 2, probity_stratum, '', 'stratum', '', probity_stratum, toString(sum(probity_n)), transform(probity_stratum, ['north|web|[0,0.5)', 'south|app|[0.5,0.9)', 's\'\\|x|[0.9,1]'], ['345', '230', '2'], ''), transform(probity_stratum, ['north|web|[0,0.5)', 'south|app|[0.5,0.9)', 's\'\\|x|[0.9,1]'], ['2', '2', '0'], ''), '', '', '', '', '', ''
  FROM (
    WITH
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
      concat(probity_s1, '|', probity_s2, '|', multiIf(NOT probity_b1_in_range, '', probity_b1_sign != '-' AND (probity_b1_d != '' AND (probity_b1_p > 0 OR (probity_b1_p = 0 AND probity_b1_d > '899999999999999966693309261245303787291049957275390625'))), '[0.9,1]', probity_b1_sign != '-' AND ((probity_b1_d != '' AND (probity_b1_p > 0 OR (probity_b1_p = 0 AND probity_b1_d > '4999999999999999722444243843710864894092082977294921875'))) OR (probity_b1_p = 0 AND probity_b1_d = '4999999999999999722444243843710864894092082977294921875')), '[0.5,0.9)', '[0,0.5)')) AS probity_stratum
    SELECT probity_stratum, count() AS probity_n
    FROM "analytics"."pred.log" AS t
    WHERE probity_in_scope
    GROUP BY probity_stratum
  )
  GROUP BY probity_stratum
  UNION ALL
  SELECT 3, probity_stratum, lower(hex(probity_r.1)), 'item', probity_r.2, probity_stratum, transform(probity_stratum, ['north|web|[0,0.5)', 'south|app|[0.5,0.9)', 's\'\\|x|[0.9,1]'], ['12000', '7998', '2'], ''), transform(probity_stratum, ['north|web|[0,0.5)', 'south|app|[0.5,0.9)', 's\'\\|x|[0.9,1]'], ['345', '230', '2'], ''), transform(probity_stratum, ['north|web|[0,0.5)', 'south|app|[0.5,0.9)', 's\'\\|x|[0.9,1]'], ['2', '2', '0'], ''), '', lower(hex(probity_r.1)), '', probity_r.3, probity_r.4, probity_r.5
  FROM (
    SELECT probity_stratum, arraySlice(arraySort(groupArray(tuple(probity_key, probity_id, probity_v1, probity_v2, probity_v3))), 1, transform(probity_stratum, ['north|web|[0,0.5)', 'south|app|[0.5,0.9)', 's\'\\|x|[0.9,1]'], [347, 232, 2], 0)) AS probity_rs
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
        SHA256(concat('it\'s a \\ seed:', probity_id)) AS probity_key,
        ifNull(toString(t."model_a"), '(null)') AS probity_v1,
        ifNull(toString(t."score"), '(null)') AS probity_v2,
        ifNull(toString(t."text"), '(null)') AS probity_v3
      SELECT probity_stratum, probity_key, probity_id, probity_v1, probity_v2, probity_v3
      FROM "analytics"."pred.log" AS t
      WHERE probity_in_scope AND probity_stratum IN ('north|web|[0,0.5)', 's\'\\|x|[0.9,1]', 'south|app|[0.5,0.9)')
      ORDER BY probity_stratum, probity_key
      LIMIT 347 BY probity_stratum
    )
    GROUP BY probity_stratum
  )
  ARRAY JOIN probity_rs AS probity_r
)
ORDER BY sec, sk, sk2
SETTINGS distributed_group_by_no_merge = 1, skip_unavailable_shards = 0, extremes = 0, read_overflow_mode = 'throw', group_by_overflow_mode = 'throw', sort_overflow_mode = 'throw', result_overflow_mode = 'throw', timeout_overflow_mode = 'throw', set_overflow_mode = 'throw'
FORMAT CSVWithNames
