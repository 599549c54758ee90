// placements_add_missing: place the members of some categories that have no placement through them yet (items
// that arrived since the last placing), through the categories' live edges; placements made before are kept.
// Live = accepted, or auto (a category with an accepted edge has no machine edges). writes: PLACED_IN.
// parameters: $uids (category uids), $reference. safe to re-run (a placed member is skipped).
MATCH (i:Item)-[:FILED_UNDER]->(c:Category)
WHERE c.uid IN $uids
  AND NOT EXISTS { MATCH (i)-[p:PLACED_IN]->(:Concept) WHERE p.via = c.uid }
MATCH (c)-[m:MAPS_TO]->(k:Concept)
WHERE k.scheme = $reference AND m.status IN ['accepted', 'auto']
CREATE (i)-[:PLACED_IN {via: c.uid, score: m.score, status: m.status}]->(k)
