// query_drilldown: the items placed on a concept (and, with $descendants, on anything below it), each with the
// source category it came through and the MAPS_TO edge that placed it.
// reads: Concept, BROADER, PLACED_IN, Item, Category, MAPS_TO. writes: nothing. read-only, safe to re-run.
// parameters: $root (concept uid); $max_hops (0 = the concept only, 30 = every descendant); $statuses;
// $sources ([] = all); $attributes (['{'] = no filter); $limit (rows).
MATCH (r:Concept {uid: $root})<-[:BROADER*0..30]-(d:Concept)<-[p:PLACED_IN]-(i:Item)
WHERE d.depth - r.depth <= $max_hops AND p.status IN $statuses
  AND (size($sources) = 0 OR i.source IN $sources)
  AND all(a IN $attributes WHERE i.attributes CONTAINS a)
MATCH (c:Category {uid: p.via})-[m:MAPS_TO]->(d)
WHERE m.status = p.status
RETURN i.source AS source, i.item_key AS item_key, i.title AS title, i.attributes AS attributes,
       c.code AS category_code, c.label AS category_label, c.path AS category_path,
       d.code AS concept_code, d.pref_label AS concept_label, d.depth AS concept_depth,
       m.status AS status, m.score AS score, m.rank AS rank, m.match_type AS match_type, m.method AS method,
       m.decided_by AS decided_by, m.decided_at AS decided_at
ORDER BY source, item_key, category_code, concept_code
LIMIT $limit
