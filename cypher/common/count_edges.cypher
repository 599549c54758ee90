// count_edges: MAPS_TO edges by source and status, and PLACED_IN and FILED_UNDER by source.
// reads: MAPS_TO, PLACED_IN, FILED_UNDER. parameters: none. read-only.
MATCH (c:Category)-[m:MAPS_TO]->(:Concept) RETURN 'MAPS_TO' AS kind, c.scheme AS scheme, m.status AS status, count(*) AS n
UNION ALL
MATCH (i:Item)-[:PLACED_IN]->(:Concept) RETURN 'PLACED_IN' AS kind, i.source AS scheme, '' AS status, count(*) AS n
UNION ALL
MATCH (i:Item)-[:FILED_UNDER]->(:Category) RETURN 'FILED_UNDER' AS kind, i.source AS scheme, '' AS status, count(*) AS n
