// review_event_create: append one entry to the history of an edge (never updated afterwards).
// writes: EdgeEvent. parameters: $id, $seq, $at, $action, $source, $category, $concept, $status, $status_before,
// $score, $rank, $run_id, $actor, $note, $concept_hash, $ref. Not idempotent (append-only): callers check $ref.
CREATE (e:EdgeEvent {id: $id, seq: $seq, at: $at, action: $action, source: $source, category: $category,
                     concept: $concept, status: $status, status_before: $status_before, score: $score,
                     rank: $rank, run_id: $run_id, actor: $actor, note: $note, concept_hash: $concept_hash,
                     ref: $ref})
