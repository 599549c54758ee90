// review_concept_tree: every concept of a reference, retired ones included, with its parent links (one row per
// link), labels, path, depth and content hash. reads: Concept, BROADER. parameters: $reference. read-only.
MATCH (k:Concept)
WHERE k.scheme = $reference
OPTIONAL MATCH (k)-[:BROADER]->(p:Concept)
RETURN k.uid AS uid, k.code AS code, k.pref_label AS label, k.alt_labels AS alt_labels, k.path AS path,
       k.depth AS depth, k.retired AS retired, k.content_hash AS content_hash, p.uid AS parent
ORDER BY uid, parent
