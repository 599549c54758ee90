// query_rollup_status: like query_rollup, but each item under a concept is counted once under the strongest
// status it was placed by there ('accepted' over 'auto'), for coverage views by top-level concept.
// Kept as the engine-only reference for coverage_by_top, which now counts with ancestry.rollup_status_long.
// reads: Concept, BROADER, PLACED_IN, Item. writes: nothing. read-only, safe to re-run.
// parameters: $reference, $min_depth, $max_depth, $statuses, $sources ([] = all), $attributes (['{'] = no filter).
MATCH (k:Concept)
WHERE k.scheme = $reference AND k.depth >= $min_depth AND k.depth <= $max_depth
MATCH (k)<-[:BROADER*0..30]-(d:Concept)<-[p:PLACED_IN]-(i:Item)
WHERE p.status IN $statuses AND (size($sources) = 0 OR i.source IN $sources)
  AND all(a IN $attributes WHERE i.attributes CONTAINS a)
WITH k, i, collect(p.status) AS st
RETURN k.code AS concept_code, k.pref_label AS concept_label, k.depth AS depth, i.source AS source,
       CASE WHEN 'accepted' IN st THEN 'accepted' ELSE 'auto' END AS placed_by, count(*) AS items
ORDER BY concept_code, source, placed_by
