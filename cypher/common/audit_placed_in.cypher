// audit_placed_in: every PLACED_IN edge with its fields, one row per edge (a duplicated edge shows twice).
// reads: Item, PLACED_IN, Concept. writes: nothing. parameters: none. read-only, safe to re-run.
MATCH (i:Item)-[p:PLACED_IN]->(k:Concept)
RETURN i.uid AS item, k.uid AS concept, p.via AS via, p.score AS score, p.status AS status
