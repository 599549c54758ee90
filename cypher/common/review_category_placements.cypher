// review_category_placements: where the items of one category are placed now, per concept and edge status.
// reads: PLACED_IN. parameters: $uid (category uid). read-only.
MATCH (i:Item)-[p:PLACED_IN]->(k:Concept)
WHERE p.via = $uid
RETURN k.uid AS concept, p.status AS status, count(DISTINCT i.uid) AS items
ORDER BY concept
