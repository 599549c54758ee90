// review_events_bulk: append many edge events at once (a map run's proposals), in bulk.
// writes: EdgeEvent. parameters: $rows (id, seq, at, action, source, category, concept, status, status_before,
// score, rank, run_id, actor, note, concept_hash, ref). Not idempotent (append-only): the caller writes each
// run's events once.
UNWIND $rows AS r
CREATE (e:EdgeEvent {id: r.id, seq: r.seq, at: r.at, action: r.action, source: r.source, category: r.category,
                     concept: r.concept, status: r.status, status_before: r.status_before, score: r.score,
                     rank: r.rank, run_id: r.run_id, actor: r.actor, note: r.note, concept_hash: r.concept_hash,
                     ref: r.ref})
