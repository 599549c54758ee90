// concept_structure: live concepts of a reference scheme with their parent links (one row per link).
// reads: Concept, BROADER. parameters: $scheme. read-only.
MATCH (c:Concept) WHERE c.scheme = $scheme AND c.retired = false
OPTIONAL MATCH (c)-[:BROADER]->(p:Concept)
RETURN c.uid AS uid, c.code AS code, c.pref_label AS label, c.alt_labels AS alt_labels, c.depth AS depth,
       c.is_leaf AS is_leaf, p.uid AS parent
ORDER BY uid, parent
