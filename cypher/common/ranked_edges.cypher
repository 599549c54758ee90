// ranked_edges: every edge of one source into one reference with its rank, score and status (for evaluation).
// reads: Category, MAPS_TO, Concept. parameters: $source, $reference. read-only.
MATCH (c:Category)-[m:MAPS_TO]->(k:Concept)
WHERE c.scheme = $source AND k.scheme = $reference
RETURN c.code AS source_code, k.code AS concept_code, m.rank AS rank, m.score AS score, m.status AS status
ORDER BY source_code, rank
