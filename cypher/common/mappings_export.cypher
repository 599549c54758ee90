// mappings_export: every MAPS_TO edge up to a rank, with both ends' codes and labels.
// reads: Category, MAPS_TO, Concept. parameters: $max_rank, $sources (list; empty = all). read-only.
MATCH (c:Category)-[m:MAPS_TO]->(k:Concept)
WHERE (m.rank <= $max_rank OR m.status IN ['accepted', 'rejected'])
  AND (size($sources) = 0 OR c.scheme IN $sources)
RETURN c.scheme AS source_scheme, c.code AS source_code, c.label AS source_label, m.rank AS rank,
       k.code AS concept_code, k.pref_label AS concept_label, m.score AS score, m.match_type AS match_type,
       m.status AS status, k.scheme AS reference_scheme
ORDER BY source_scheme, source_code, rank, concept_code
