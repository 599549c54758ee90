// rollup_placements_packed: rollup_placements in one number per placement, item * 4194304 + concept * 4 +
// status (1 accepted, 2 auto, 0 other): moving one column instead of three halves the cost of reading a million
// placements into Python. Only for concept keys below 1048576 (pipeline/query/ancestry.py checks).
// reads: Item, PLACED_IN, Concept. writes: nothing. parameters: none. read-only, safe to re-run.
MATCH (i:Item)-[p:PLACED_IN]->(d:Concept)
RETURN id(i) * 4194304 + id(d) * 4 + CASE p.status WHEN 'accepted' THEN 1 WHEN 'auto' THEN 2 ELSE 0 END AS packed
