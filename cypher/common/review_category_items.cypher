// review_category_items: the first items filed under one category, by key. reads: Item, FILED_UNDER, Category.
// parameters: $uid (category uid), $limit. read-only.
MATCH (i:Item)-[:FILED_UNDER]->(c:Category {uid: $uid})
RETURN i.item_key AS item_key, i.title AS title
ORDER BY item_key
LIMIT $limit
