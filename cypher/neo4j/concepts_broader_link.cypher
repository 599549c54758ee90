// concepts_broader_link: child-to-parent links between concepts, in bulk.
// writes: BROADER edges. parameters: $rows (child, parent uids). safe to re-run (MERGE).
UNWIND $rows AS r
MATCH (a:Concept {uid: r.child})
MATCH (b:Concept {uid: r.parent})
MERGE (a)-[:BROADER]->(b)
