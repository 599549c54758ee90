// rollup_placements: every placement as numbers (item key, concept key, status 1 accepted / 2 auto / 0 other), so the
// rollup can count distinct items per concept in numpy; status, source and attribute filters are applied by the
// caller (an `IN $list` test per row cost more than the whole scan on the embedded engine).
// reads: Item, PLACED_IN, Concept. writes: nothing. parameters: none. read-only, safe to re-run.
// Keys match rollup_hierarchy (concepts) and rollup_item_runs / rollup_items (items).
MATCH (i:Item)-[p:PLACED_IN]->(d:Concept)
RETURN id(i) AS item, id(d) AS concept, CASE p.status WHEN 'accepted' THEN 1 WHEN 'auto' THEN 2 ELSE 0 END AS status
