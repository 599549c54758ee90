// items_file_under: membership links from items to their source categories, in bulk.
// writes: FILED_UNDER edges. parameters: $rows (item, category uids). safe to re-run (MERGE).
UNWIND $rows AS r
MATCH (i:Item {uid: r.item})
MATCH (c:Category {uid: r.category})
MERGE (i)-[:FILED_UNDER]->(c)
