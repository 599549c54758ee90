// review_edge_delete: drop one MAPS_TO edge (a machine edge superseded by a decision, or a person's own edge that
// was reopened). writes: deletes MAPS_TO. parameters: $category, $concept (uids). safe to re-run.
MATCH (c:Category {uid: $category})-[m:MAPS_TO]->(k:Concept {uid: $concept})
DELETE m
