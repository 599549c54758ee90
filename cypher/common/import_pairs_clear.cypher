// import_pairs_clear: drop every MAPS_TO edge between the given (category, concept) pairs, whatever its status,
// before the imported decision for that pair is written.
// reads: Category, Concept. writes: deletes MAPS_TO. parameters: $rows (list of {category, concept} uids).
// safe to re-run.
UNWIND $rows AS r
MATCH (c:Category {uid: r.category})-[m:MAPS_TO]->(k:Concept {uid: r.concept})
DELETE m
