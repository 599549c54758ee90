// category_members: member item titles of every live category of a source, for the members signal.
// reads: Item, FILED_UNDER, Category. parameters: $scheme. read-only.
MATCH (i:Item)-[:FILED_UNDER]->(c:Category)
WHERE c.scheme = $scheme AND c.retired = false
RETURN c.uid AS uid, i.uid AS item, i.title AS title
ORDER BY uid, item
