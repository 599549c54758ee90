// query_concepts: every live concept of a reference with its parent code (one row per parent link), for trees,
// paths and top-level lookups in the analyst queries and exports.
// reads: Concept, BROADER. writes: nothing. parameters: $reference (scheme key). read-only, safe to re-run.
MATCH (k:Concept) WHERE k.scheme = $reference AND k.retired = false
OPTIONAL MATCH (k)-[:BROADER]->(p:Concept)
RETURN k.uid AS uid, k.code AS code, k.pref_label AS label, k.iri AS iri, k.depth AS depth, k.path AS path,
       k.deprecated AS deprecated, p.code AS parent_code
ORDER BY code
