// query_coverage: items per source by how they are placed on the reference: 'accepted' (through at least one
// accepted edge), 'auto' (through auto edges only), 'proposed' (not placed, but a category of the item has a
// proposed edge awaiting review) or 'unmapped' (nothing at all).
// reads: Item, PLACED_IN, Concept, FILED_UNDER, Category, MAPS_TO. writes: nothing. read-only, safe to re-run.
// parameters: $reference; $sources ([] = all); $attributes (['{'] = no filter).
MATCH (i:Item)
WHERE (size($sources) = 0 OR i.source IN $sources) AND all(a IN $attributes WHERE i.attributes CONTAINS a)
OPTIONAL MATCH (i)-[p:PLACED_IN]->(k:Concept)
WHERE k.scheme = $reference
WITH i, collect(p.status) AS st
WITH i.source AS source,
     CASE WHEN 'accepted' IN st THEN 'accepted'
          WHEN 'auto' IN st THEN 'auto'
          WHEN EXISTS { MATCH (i)-[:FILED_UNDER]->(:Category)-[m:MAPS_TO]->(x:Concept)
                        WHERE m.status = 'proposed' AND x.scheme = $reference } THEN 'proposed'
          ELSE 'unmapped' END AS placed_by
RETURN source, placed_by, count(*) AS items
ORDER BY source, placed_by
