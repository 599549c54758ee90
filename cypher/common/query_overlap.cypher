// query_overlap: items whose key occurs in more than one source, with where each copy was placed (one row per
// item copy and placement; a copy with no placement has empty concept fields).
// reads: Item, PLACED_IN, Concept. writes: nothing. read-only, safe to re-run.
// parameters: $reference; $statuses (placements that count); $sources ([] = all; only these sources are compared);
// $attributes (['{'] = no filter; applied to every copy).
MATCH (i:Item)
WHERE (size($sources) = 0 OR i.source IN $sources) AND all(a IN $attributes WHERE i.attributes CONTAINS a)
WITH i.item_key AS key, count(DISTINCT i.source) AS n
WHERE n > 1
MATCH (j:Item {item_key: key})
WHERE (size($sources) = 0 OR j.source IN $sources) AND all(a IN $attributes WHERE j.attributes CONTAINS a)
OPTIONAL MATCH (j)-[p:PLACED_IN]->(k:Concept)
WHERE p.status IN $statuses AND k.scheme = $reference
RETURN key AS item_key, j.source AS source, j.title AS title, k.code AS concept_code,
       k.pref_label AS concept_label, p.status AS status, p.via AS via
ORDER BY item_key, source, concept_code
