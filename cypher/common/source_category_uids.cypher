// source_category_uids: every category uid of a source (live or retired). reads: Category. parameters: $scheme.
MATCH (c:Category) WHERE c.scheme = $scheme RETURN c.uid AS uid ORDER BY uid
