// concept_hashes: uid, content hash and retired flag of every concept in a scheme (to diff a re-ingest).
// reads: Concept. parameters: $scheme. read-only.
MATCH (c:Concept) WHERE c.scheme = $scheme
RETURN c.uid AS uid, c.code AS code, c.content_hash AS content_hash, c.retired AS retired
