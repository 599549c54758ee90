// review_category_candidates: every MAPS_TO edge of one category into one reference, with the concept's code,
// label, path, retired flag and content hash (the columns of review_edges). reads: Category, MAPS_TO, Concept.
// parameters: $category (uid), $reference. read-only.
MATCH (c:Category {uid: $category})-[m:MAPS_TO]->(k:Concept)
WHERE k.scheme = $reference
RETURN c.uid AS category, k.uid AS concept, k.code AS concept_code, k.pref_label AS concept_label,
       k.path AS concept_path, k.retired AS concept_retired, k.content_hash AS concept_hash, m.score AS score,
       m.rank AS rank, m.status AS status, m.match_type AS match_type, m.method AS method, m.evidence AS evidence,
       m.run_id AS run_id, m.decided_by AS decided_by, m.decided_at AS decided_at, m.note AS note
ORDER BY rank, concept
