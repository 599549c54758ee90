// review_category_item_count: how many items are filed under one category. reads: Item, FILED_UNDER, Category.
// parameters: $uid (category uid). read-only.
MATCH (i:Item)-[:FILED_UNDER]->(c:Category {uid: $uid})
RETURN count(DISTINCT i.uid) AS items
