// categories_upsert: create or update source categories in bulk (new or changed rows only).
// writes: Category. parameters: $rows (uid, scheme, code, label, path, depth, is_leaf, content_hash).
// safe to re-run.
UNWIND $rows AS r
MERGE (c:Category {uid: r.uid})
SET c.scheme = r.scheme, c.code = r.code, c.label = r.label, c.path = r.path, c.depth = r.depth,
    c.is_leaf = r.is_leaf, c.retired = false, c.content_hash = r.content_hash
