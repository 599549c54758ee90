// import_categories: every category of the source schemes, live or retired, to check imported rows against.
// reads: Category. writes: nothing. parameters: $sources (scheme keys). read-only, safe to re-run.
MATCH (c:Category) WHERE c.scheme IN $sources
RETURN c.uid AS uid, c.scheme AS scheme, c.code AS code, c.label AS label, c.retired AS retired
