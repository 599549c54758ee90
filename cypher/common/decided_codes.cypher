// decided_codes: stewards' decisions on a source's edges, by code (labels for learning).
// reads: Category, MAPS_TO, Concept. parameters: $source, $reference. read-only.
MATCH (c:Category)-[m:MAPS_TO]->(k:Concept)
WHERE c.scheme = $source AND k.scheme = $reference AND m.status IN ['accepted', 'rejected']
RETURN c.code AS source_code, k.code AS concept_code, m.status AS status
