// category_texts: what the embedder reads for each live category of a source scheme.
// reads: Category. parameters: $scheme. read-only.
MATCH (c:Category) WHERE c.scheme = $scheme AND c.retired = false
RETURN c.uid AS uid, c.label AS label, c.path AS path
ORDER BY uid
