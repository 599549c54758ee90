// items_file_under: membership links from items to their source categories, in bulk.
// writes: FILED_UNDER edges. parameters: $rows (item, category uids). safe to re-run (MERGE).
LOAD FROM $rows
MATCH (i:Item {uid: item})
MATCH (c:Category {uid: category})
MERGE (i)-[:FILED_UNDER]->(c)
