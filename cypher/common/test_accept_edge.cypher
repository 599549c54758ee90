// test_accept_edge: mark one machine edge as accepted (used by tests to stand in for a steward's decision).
// writes: MAPS_TO.status. parameters: $source, $code, $concept. safe to re-run.
MATCH (c:Category)-[m:MAPS_TO]->(k:Concept)
WHERE c.scheme = $source AND c.code = $code AND k.code = $concept
SET m.status = 'accepted', m.decided_by = 'test', m.decided_at = '2026-01-01T00:00:00+00:00'
