// category_codes: every live category code of a source (to check item rows against).
// reads: Category. parameters: $scheme. read-only.
MATCH (c:Category) WHERE c.scheme = $scheme
RETURN c.code AS code
