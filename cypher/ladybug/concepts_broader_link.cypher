// concepts_broader_link: child-to-parent links between concepts, in bulk.
// writes: BROADER edges. parameters: $rows (child, parent uids). safe to re-run (MERGE).
LOAD FROM $rows
MATCH (a:Concept {uid: child})
MATCH (b:Concept {uid: parent})
MERGE (a)-[:BROADER]->(b)
