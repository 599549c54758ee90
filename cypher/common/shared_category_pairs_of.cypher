// shared_category_pairs_of: shared_category_pairs for the categories of $uids only (an incremental map needs
// instance votes for the categories it re-maps, not for the whole store). reads: Item, FILED_UNDER, Category.
// parameters: $uids (category uids). read-only.
MATCH (i:Item)-[:FILED_UNDER]->(c:Category)
WHERE c.uid IN $uids AND c.retired = false
MATCH (o:Item)-[:FILED_UNDER]->(d:Category)
WHERE o.item_key = i.item_key AND o.source <> i.source AND d.retired = false
RETURN c.uid AS category, d.uid AS other, count(DISTINCT i.uid) AS items
