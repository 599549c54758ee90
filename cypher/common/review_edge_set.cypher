// review_edge_set: record a person's decision on one existing MAPS_TO edge.
// writes: MAPS_TO status, decided_by, decided_at, note. parameters: $category, $concept (uids), $status, $by, $at,
// $note. safe to re-run (sets the same values).
MATCH (c:Category {uid: $category})-[m:MAPS_TO]->(k:Concept {uid: $concept})
SET m.status = $status, m.decided_by = $by, m.decided_at = $at, m.note = $note
