// review_item_keys: item key and live category of every filing of some sources (to find categories of two sources
// that share item keys). reads: Item, FILED_UNDER, Category. parameters: $sources (list; empty = all). read-only.
MATCH (i:Item)-[:FILED_UNDER]->(c:Category)
WHERE c.retired = false AND (size($sources) = 0 OR c.scheme IN $sources)
RETURN i.source AS source, i.item_key AS item_key, c.uid AS category
