// audit_maps_to: every MAPS_TO edge with its fields except the run id, one row per edge (duplicates show).
// reads: Category, MAPS_TO, Concept. writes: nothing. parameters: none. read-only, safe to re-run.
MATCH (c:Category)-[m:MAPS_TO]->(k:Concept)
RETURN c.uid AS category, k.uid AS concept, m.score AS score, m.rank AS rank, m.match_type AS match_type,
       m.status AS status, m.method AS method, m.evidence AS evidence, m.decided_by AS decided_by,
       m.decided_at AS decided_at, m.note AS note
