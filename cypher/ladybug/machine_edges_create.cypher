// machine_edges_create: write scored candidate edges from a map run, in bulk.
// writes: MAPS_TO. parameters: $rows (category, concept, score, rank, match_type, status, method, evidence,
// run_id). Run after machine_edges_clear for the same categories, in one transaction.
LOAD FROM $rows
MATCH (a:Category {uid: category})
MATCH (b:Concept {uid: concept})
CREATE (a)-[:MAPS_TO {score: score, rank: rank, match_type: match_type, status: status, method: method,
                      evidence: evidence, run_id: run_id, decided_by: '', decided_at: '', note: ''}]->(b)
