// review_edges: every MAPS_TO edge of the live categories of some sources into one reference, with the concept's
// code, label, path, retired flag and content hash. reads: Category, MAPS_TO, Concept.
// parameters: $sources (list; empty = all), $reference. read-only.
MATCH (c:Category)-[m:MAPS_TO]->(k:Concept)
WHERE c.retired = false AND k.scheme = $reference AND (size($sources) = 0 OR c.scheme IN $sources)
RETURN c.uid AS category, k.uid AS concept, k.code AS concept_code, k.pref_label AS concept_label,
       k.path AS concept_path, k.retired AS concept_retired, k.content_hash AS concept_hash, m.score AS score,
       m.rank AS rank, m.status AS status, m.match_type AS match_type, m.method AS method, m.evidence AS evidence,
       m.run_id AS run_id, m.decided_by AS decided_by, m.decided_at AS decided_at, m.note AS note
ORDER BY category, rank, concept
