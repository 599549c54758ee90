// machine_edges_create: write scored candidate edges from a map run, in bulk.
// writes: MAPS_TO. parameters: $rows (category, concept, score, rank, match_type, status, method, evidence,
// run_id). Run after machine_edges_clear for the same categories, in one transaction.
UNWIND $rows AS r
MATCH (a:Category {uid: r.category})
MATCH (b:Concept {uid: r.concept})
CREATE (a)-[:MAPS_TO {score: r.score, rank: r.rank, match_type: r.match_type, status: r.status,
                      method: r.method, evidence: r.evidence, run_id: r.run_id, decided_by: '', decided_at: '',
                      note: ''}]->(b)
