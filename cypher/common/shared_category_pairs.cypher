// shared_category_pairs: pairs of categories of different sources that hold items with the same item key,
// with how many items of the first category are shared. reads: Item, FILED_UNDER, Category. parameters: none.
MATCH (i:Item)-[:FILED_UNDER]->(c:Category)
MATCH (o:Item)-[:FILED_UNDER]->(d:Category)
WHERE o.item_key = i.item_key AND o.source <> i.source AND c.retired = false AND d.retired = false
RETURN c.uid AS category, d.uid AS other, count(DISTINCT i.uid) AS items
