// review_member_titles: titles of the items filed under some categories, in a stable order.
// reads: Item, FILED_UNDER, Category. parameters: $uids (category uids). read-only.
MATCH (i:Item)-[:FILED_UNDER]->(c:Category)
WHERE c.uid IN $uids
RETURN c.uid AS category, i.item_key AS item_key, i.title AS title
ORDER BY category, item_key
