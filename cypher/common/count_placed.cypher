// count_placed: placements and distinct placed items on one reference. reads: PLACED_IN. parameters: $reference.
MATCH (i:Item)-[p:PLACED_IN]->(k:Concept) WHERE k.scheme = $reference
RETURN count(p) AS placements, count(DISTINCT i.uid) AS items
