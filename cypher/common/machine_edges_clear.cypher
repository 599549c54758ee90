// machine_edges_clear: drop the machine-made edges (auto, proposed) of some categories before a re-map.
// Decided edges (accepted, rejected) are never touched. writes: deletes MAPS_TO. parameters: $uids, $reference.
// safe to re-run.
MATCH (c:Category)-[m:MAPS_TO]->(k:Concept)
WHERE c.uid IN $uids AND k.scheme = $reference AND m.status IN ['auto', 'proposed']
DELETE m
