// import_edges_existing: the MAPS_TO edges of some categories into one reference, to tell which imported
// decisions are new, changed or already there.
// reads: Category, MAPS_TO, Concept. writes: nothing. parameters: $uids (category uids), $reference. read-only.
MATCH (c:Category)-[m:MAPS_TO]->(k:Concept)
WHERE c.uid IN $uids AND k.scheme = $reference
RETURN c.uid AS category, k.uid AS concept, m.status AS status, m.match_type AS match_type, m.score AS score
