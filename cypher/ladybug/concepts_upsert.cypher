// concepts_upsert: create or update concepts in bulk (new or changed rows only; the caller diffs by hash).
// writes: Concept. parameters: $rows (uid, scheme, code, iri, pref_label, alt_labels, definition, path, depth,
// is_leaf, deprecated, content_hash). safe to re-run.
LOAD FROM $rows
MERGE (c:Concept {uid: uid})
SET c.scheme = scheme, c.code = code, c.iri = iri, c.pref_label = pref_label, c.alt_labels = alt_labels,
    c.definition = definition, c.path = path, c.depth = depth, c.is_leaf = is_leaf, c.deprecated = deprecated,
    c.retired = false, c.content_hash = content_hash
