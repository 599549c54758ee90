// placements_add_missing: place the members of some categories that have no placement through them yet (items
// that arrived since the last placing), through the categories' live edges; placements made before are kept.
// Live = accepted, or auto (a category with an accepted edge has no machine edges). writes: PLACED_IN.
// parameters: $uids (category uids), $reference. safe to re-run (a placed member is skipped).
// LadybugDB 0.22 evaluates `x IN $list` by scanning the list for every row, so each uid is looked up by key;
// and it refuses a `WITH` between the NOT EXISTS filter and the CREATE ("Cannot evaluate expression with type
// VARIABLE"), hence one MATCH chain.
UNWIND $uids AS u
MATCH (c:Category {uid: u})<-[:FILED_UNDER]-(i:Item)
WHERE NOT EXISTS { MATCH (i)-[p:PLACED_IN]->(:Concept) WHERE p.via = u }
MATCH (c)-[m:MAPS_TO]->(k:Concept)
WHERE k.scheme = $reference AND m.status IN ['accepted', 'auto']
CREATE (i)-[:PLACED_IN {via: c.uid, score: m.score, status: m.status}]->(k)
