// live_top_edges: the concept each category of a source currently lands on (accepted first, else rank-1 auto
// or proposed), for incremental re-maps. reads: Category, MAPS_TO, Concept. parameters: $source, $reference.
MATCH (c:Category)-[m:MAPS_TO]->(k:Concept)
WHERE c.scheme = $source AND k.scheme = $reference AND (m.status = 'accepted' OR m.rank = 1)
  AND m.status <> 'rejected'
RETURN c.uid AS category, k.uid AS concept, m.status AS status
