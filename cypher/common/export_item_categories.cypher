// export_item_categories: the source categories each item is filed under (one row per link).
// reads: Item, FILED_UNDER, Category. writes: nothing. parameters: $sources ([] = all). read-only.
MATCH (i:Item)-[:FILED_UNDER]->(c:Category)
WHERE size($sources) = 0 OR i.source IN $sources
RETURN i.uid AS item_uid, c.uid AS category_uid, c.code AS category_code, c.label AS category_label
ORDER BY item_uid, category_code
