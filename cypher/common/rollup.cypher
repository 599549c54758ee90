// rollup: items per reference concept, counting everything placed on the concept or any descendant, per source.
// reads: Concept, BROADER, PLACED_IN, Item. parameters: $reference, $min_depth, $max_depth, $root (concept uid
// or '' for the whole hierarchy), $statuses (edge statuses that count, e.g. ['accepted', 'auto']). read-only.
MATCH (k:Concept)
WHERE k.scheme = $reference AND k.depth >= $min_depth AND k.depth <= $max_depth
  AND ($root = '' OR k.uid = $root OR EXISTS { MATCH (k)-[:BROADER*1..30]->(r:Concept {uid: $root}) })
MATCH (k)<-[:BROADER*0..30]-(d:Concept)<-[p:PLACED_IN]-(i:Item)
WHERE p.status IN $statuses
RETURN k.code AS concept_code, k.pref_label AS concept_label, k.depth AS depth, i.source AS source,
       count(DISTINCT i.uid) AS items
ORDER BY concept_code, source
