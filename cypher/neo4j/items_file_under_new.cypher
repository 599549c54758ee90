// items_file_under_new: FILED_UNDER links of items created in the same transaction.
// writes: FILED_UNDER edges. parameters: $rows (item, category uids). safe to re-run (MERGE).
UNWIND $rows AS r
MATCH (i:Item {uid: r.item})
MATCH (c:Category {uid: r.category})
MERGE (i)-[:FILED_UNDER]->(c)
