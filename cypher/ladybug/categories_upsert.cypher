// categories_upsert: create or update source categories in bulk (new or changed rows only).
// writes: Category. parameters: $rows (uid, scheme, code, label, path, depth, is_leaf, content_hash).
// safe to re-run.
LOAD FROM $rows
MERGE (c:Category {uid: uid})
SET c.scheme = scheme, c.code = code, c.label = label, c.path = path, c.depth = depth, c.is_leaf = is_leaf,
    c.retired = false, c.content_hash = content_hash
