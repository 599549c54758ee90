// audit_concepts: every concept with its content fields, for a canonical export of the graph (tests).
// reads: Concept. writes: nothing. parameters: none. read-only, safe to re-run.
MATCH (c:Concept)
RETURN c.uid AS uid, c.scheme AS scheme, c.code AS code, c.iri AS iri, c.pref_label AS pref_label,
       c.alt_labels AS alt_labels, c.definition AS definition, c.path AS path, c.depth AS depth,
       c.is_leaf AS is_leaf, c.deprecated AS deprecated, c.retired AS retired, c.content_hash AS content_hash
ORDER BY uid
