// query_concept_mappings: how many source categories point at each concept through live edges, per source and
// edge status (for the subtree view).
// reads: Category, MAPS_TO, Concept. writes: nothing. parameters: $uids (concept uids), $statuses. read-only.
MATCH (c:Category)-[m:MAPS_TO]->(k:Concept)
WHERE k.uid IN $uids AND m.status IN $statuses AND c.retired = false
RETURN k.code AS concept_code, c.scheme AS source, count(DISTINCT c.uid) AS categories
ORDER BY concept_code, source
