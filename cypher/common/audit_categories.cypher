// audit_categories: every category with its content fields and durable job marks (mapped_with, place_dirty, place_new),
// for a canonical export of the graph (tests). reads: Category. writes: nothing. parameters: none. read-only.
MATCH (c:Category)
RETURN c.uid AS uid, c.scheme AS scheme, c.code AS code, c.label AS label, c.path AS path, c.depth AS depth,
       c.is_leaf AS is_leaf, c.retired AS retired, c.content_hash AS content_hash, c.mapped_with AS mapped_with,
       c.place_dirty AS place_dirty, c.place_new AS place_new
ORDER BY uid
