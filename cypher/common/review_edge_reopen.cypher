// review_edge_reopen: hand a decided edge that a run had proposed back to the machine (status proposed; the next
// map run replaces it). writes: MAPS_TO status and decision fields. parameters: $category, $concept (uids).
// safe to re-run.
MATCH (c:Category {uid: $category})-[m:MAPS_TO]->(k:Concept {uid: $concept})
SET m.status = 'proposed', m.decided_by = '', m.decided_at = '', m.note = ''
