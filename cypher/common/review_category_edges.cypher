// review_category_edges: the MAPS_TO edges of one category into one reference (what a decision starts from).
// reads: Category, MAPS_TO, Concept. parameters: $category (uid), $reference. read-only.
MATCH (c:Category {uid: $category})-[m:MAPS_TO]->(k:Concept)
WHERE k.scheme = $reference
RETURN k.uid AS concept, k.code AS concept_code, k.content_hash AS concept_hash, m.score AS score,
       m.rank AS rank, m.status AS status, m.method AS method, m.run_id AS run_id
ORDER BY rank, concept
