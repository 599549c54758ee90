// categories_broader_link: child-to-parent links between categories, in bulk.
// writes: BROADER edges. parameters: $rows (child, parent uids). safe to re-run (MERGE).
LOAD FROM $rows
MATCH (a:Category {uid: child})
MATCH (b:Category {uid: parent})
MERGE (a)-[:BROADER]->(b)
