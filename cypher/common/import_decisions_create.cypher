// import_decisions_create: write imported decisions as MAPS_TO edges (status accepted or rejected, method
// imported). Run after import_pairs_clear for the same pairs, in one transaction (else edges are doubled).
// reads: Category, Concept. writes: MAPS_TO. parameters: $rows (list of {category, concept, score, rank,
// match_type, status, evidence, run_id, decided_by, decided_at, note}).
UNWIND $rows AS r
MATCH (c:Category {uid: r.category})
MATCH (k:Concept {uid: r.concept})
CREATE (c)-[:MAPS_TO {score: r.score, rank: r.rank, match_type: r.match_type, status: r.status,
                      method: 'imported', evidence: r.evidence, run_id: r.run_id, decided_by: r.decided_by,
                      decided_at: r.decided_at, note: r.note}]->(k)
