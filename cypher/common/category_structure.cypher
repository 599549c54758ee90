// category_structure: live categories of a source scheme with their parent links (one row per link).
// reads: Category, BROADER. parameters: $scheme. read-only.
MATCH (c:Category) WHERE c.scheme = $scheme AND c.retired = false
OPTIONAL MATCH (c)-[:BROADER]->(p:Category)
RETURN c.uid AS uid, c.code AS code, c.label AS label, c.depth AS depth, c.is_leaf AS is_leaf, p.uid AS parent
ORDER BY uid, parent
