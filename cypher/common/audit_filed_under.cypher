// audit_filed_under: every FILED_UNDER edge, one row per edge (a duplicated edge shows twice).
// reads: Item, FILED_UNDER, Category. writes: nothing. parameters: none. read-only, safe to re-run.
MATCH (i:Item)-[:FILED_UNDER]->(c:Category) RETURN i.uid AS item, c.uid AS category
