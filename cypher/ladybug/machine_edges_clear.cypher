// machine_edges_clear: drop the machine-made edges (auto, proposed) of some categories before a re-map.
// Decided edges (accepted, rejected) are never touched. writes: deletes MAPS_TO. parameters: $uids, $reference.
// safe to re-run. LadybugDB form: each uid found by primary key (`c.uid IN $uids` costs list length x rows here).
UNWIND $uids AS u
MATCH (c:Category {uid: u})-[m:MAPS_TO]->(k:Concept)
WHERE k.scheme = $reference AND m.status IN ['auto', 'proposed']
DELETE m
