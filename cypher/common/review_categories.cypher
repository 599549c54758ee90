// review_categories: live categories of some sources with their parent links and how many items are filed under
// each (one row per parent link). reads: Category, BROADER, FILED_UNDER, Item.
// parameters: $sources (list of source keys; empty = all sources). read-only.
MATCH (c:Category)
WHERE c.retired = false AND (size($sources) = 0 OR c.scheme IN $sources)
OPTIONAL MATCH (c)-[:BROADER]->(p:Category)
OPTIONAL MATCH (i:Item)-[:FILED_UNDER]->(c)
RETURN c.uid AS uid, c.scheme AS source, c.code AS code, c.label AS label, c.path AS path, c.depth AS depth,
       p.uid AS parent, count(DISTINCT i.uid) AS items
ORDER BY uid, parent
