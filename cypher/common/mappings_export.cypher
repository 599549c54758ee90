// mappings_export: every MAPS_TO edge up to a rank, plus every live (accepted, auto) and rejected edge at any rank
// (a category split over several concepts has several auto edges), with both ends' codes, labels and
// ids, and the edge's provenance, for the mapping exporters (CSV, SSSOM TSV, SKOS Turtle).
// reads: Category, MAPS_TO, Concept. writes: nothing. parameters: $max_rank, $sources (list; empty = all).
// read-only, safe to re-run.
MATCH (c:Category)-[m:MAPS_TO]->(k:Concept)
WHERE (m.rank <= $max_rank OR m.status IN ['accepted', 'auto', 'rejected'])
  AND (size($sources) = 0 OR c.scheme IN $sources)
RETURN c.scheme AS source_scheme, c.code AS source_code, c.label AS source_label, m.rank AS rank,
       k.code AS concept_code, k.pref_label AS concept_label, m.score AS score, m.match_type AS match_type,
       m.status AS status, k.scheme AS reference_scheme, c.uid AS category_uid, k.uid AS concept_uid,
       k.iri AS concept_iri, m.method AS method, m.decided_by AS decided_by, m.decided_at AS decided_at,
       m.note AS note, m.run_id AS run_id
ORDER BY source_scheme, source_code, rank, concept_code
