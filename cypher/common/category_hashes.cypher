// category_hashes: uid, content hash and retired flag of every category in a source scheme.
// reads: Category. parameters: $scheme. read-only.
MATCH (c:Category) WHERE c.scheme = $scheme
RETURN c.uid AS uid, c.code AS code, c.content_hash AS content_hash, c.retired AS retired
