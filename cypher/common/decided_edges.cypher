// decided_edges: a person's decisions on a source's edges into one reference scheme (never overwritten by runs).
// reads: Category, MAPS_TO, Concept. parameters: $source, $reference. read-only.
MATCH (c:Category)-[m:MAPS_TO]->(k:Concept)
WHERE c.scheme = $source AND k.scheme = $reference AND m.status IN ['accepted', 'rejected']
RETURN c.uid AS category, k.uid AS concept, m.status AS status
