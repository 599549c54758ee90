// concept_texts: what the embedder reads for each live concept of a reference scheme.
// reads: Concept. parameters: $scheme. read-only.
MATCH (c:Concept) WHERE c.scheme = $scheme AND c.retired = false
RETURN c.uid AS uid, c.pref_label AS label, c.path AS path, c.alt_labels AS alt_labels, c.definition AS definition
ORDER BY uid
