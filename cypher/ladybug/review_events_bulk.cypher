// review_events_bulk: append many edge events at once (a map run's proposals), in bulk.
// writes: EdgeEvent. parameters: $rows (id, seq, at, action, source, category, concept, status, status_before,
// score, rank, run_id, actor, note, concept_hash, ref). Not idempotent (append-only): the caller writes each
// run's events once.
LOAD FROM $rows
CREATE (e:EdgeEvent {id: id, seq: seq, at: at, action: action, source: source, category: category,
                     concept: concept, status: status, status_before: status_before, score: score, rank: rank,
                     run_id: run_id, actor: actor, note: note, concept_hash: concept_hash, ref: ref})
