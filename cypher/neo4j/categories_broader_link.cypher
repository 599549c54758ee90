// categories_broader_link: child-to-parent links between categories, in bulk.
// writes: BROADER edges. parameters: $rows (child, parent uids). safe to re-run (MERGE).
UNWIND $rows AS r
MATCH (a:Category {uid: r.child})
MATCH (b:Category {uid: r.parent})
MERGE (a)-[:BROADER]->(b)
