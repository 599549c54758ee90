// review_concept_mapped: the live categories whose edges point at one concept, with status and score.
// reads: Category, MAPS_TO, Concept. parameters: $uid (concept uid). read-only.
MATCH (c:Category)-[m:MAPS_TO]->(k:Concept {uid: $uid})
WHERE c.retired = false
RETURN c.uid AS category, c.scheme AS source, c.code AS code, c.path AS path, m.status AS status,
       m.score AS score, m.rank AS rank
ORDER BY status, source, code
