// placements_create: place the items of some categories on the concepts their live edges point to.
// Live = accepted, or auto when the category has no accepted edge. writes: PLACED_IN.
// parameters: $uids (category uids), $reference. Run after placements_clear for the same uids.
MATCH (i:Item)-[:FILED_UNDER]->(c:Category)-[m:MAPS_TO]->(k:Concept)
WHERE c.uid IN $uids AND k.scheme = $reference AND m.status IN ['accepted', 'auto']
CREATE (i)-[:PLACED_IN {via: c.uid, score: m.score, status: m.status}]->(k)
