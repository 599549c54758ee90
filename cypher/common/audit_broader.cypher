// audit_broader: every BROADER edge of both hierarchies, one row per edge (a duplicated edge shows twice).
// reads: Concept, Category, BROADER. writes: nothing. parameters: none. read-only, safe to re-run.
MATCH (a:Concept)-[:BROADER]->(b:Concept) RETURN a.uid AS child, b.uid AS parent
UNION ALL
MATCH (a:Category)-[:BROADER]->(b:Category) RETURN a.uid AS child, b.uid AS parent
