// query_rollup: items per reference concept, counting everything placed on the concept or any descendant, per
// source, with analyst filters.
// Kept as the engine-only reference: rollup/subtree now count with pipeline/query/ancestry.py (one pass over the
// placements, no variable-length path), and tests/test_query_ancestry.py compares the two.
// reads: Concept, BROADER, PLACED_IN, Item. writes: nothing. read-only, safe to re-run.
// parameters: $reference; $min_depth, $max_depth (concept depth window); $root (concept uid, or '' for the whole
// hierarchy); $uids (only these concepts; [] = no restriction); $statuses (placement statuses that count, e.g.
// ['accepted', 'auto']); $sources ([] = every source); $attributes (substrings of the item's attribute JSON that
// must all occur, e.g. ['"colour": "green"']; pass ['{'] for no attribute filter, since every attribute text is a
// JSON object).
MATCH (k:Concept)
WHERE k.scheme = $reference AND k.depth >= $min_depth AND k.depth <= $max_depth
  AND (size($uids) = 0 OR k.uid IN $uids)
  AND ($root = '' OR k.uid = $root OR EXISTS { MATCH (k)-[:BROADER*1..30]->(r:Concept {uid: $root}) })
MATCH (k)<-[:BROADER*0..30]-(d:Concept)<-[p:PLACED_IN]-(i:Item)
WHERE p.status IN $statuses AND (size($sources) = 0 OR i.source IN $sources)
  AND all(a IN $attributes WHERE i.attributes CONTAINS a)
RETURN k.code AS concept_code, k.pref_label AS concept_label, k.depth AS depth, i.source AS source,
       count(DISTINCT i.uid) AS items
ORDER BY concept_code, source
