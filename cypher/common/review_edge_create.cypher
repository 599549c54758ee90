// review_edge_create: a person's edge where no machine edge existed (a remap, or a rejection of a concept never
// proposed). writes: MAPS_TO. parameters: $category, $concept (uids), $status, $match_type, $rank, $by, $at, $note.
// Not safe to re-run on its own: the caller checks that no edge joins the pair first (pipeline/review/decisions.py).
MATCH (c:Category {uid: $category})
MATCH (k:Concept {uid: $concept})
CREATE (c)-[:MAPS_TO {score: NULL, rank: $rank, match_type: $match_type, status: $status, method: 'steward',
                      evidence: '', run_id: '', decided_by: $by, decided_at: $at, note: $note}]->(k)
