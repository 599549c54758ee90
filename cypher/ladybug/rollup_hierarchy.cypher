// rollup_hierarchy: every concept (all schemes, retired ones too, as query_rollup walks them) with one row per
// parent link, keyed by the engine's node id so that rollup_placements can name concepts by number, not text.
// The rollup walks this hierarchy once in Python (pipeline/query/ancestry.py) instead of once per concept.
// reads: Concept, BROADER. writes: nothing. parameters: none. read-only, safe to re-run.
// Keys: offset(id()) is the row number in the node table, stable while the store is open read-only.
MATCH (k:Concept)
OPTIONAL MATCH (k)-[:BROADER]->(p:Concept)
RETURN offset(id(k)) AS key, k.uid AS uid, k.scheme AS scheme, k.code AS code, k.pref_label AS label, k.depth AS depth,
       offset(id(p)) AS parent
