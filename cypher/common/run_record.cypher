// run_record: write or finish the ledger entry of one job execution.
// writes: Run. parameters: $id, $job, $started_at, $finished_at, $status, $parameters, $counts, $message.
// safe to re-run (MERGE on id).
MERGE (r:Run {id: $id})
SET r.job = $job, r.started_at = $started_at, r.finished_at = $finished_at, r.status = $status,
    r.parameters = $parameters, r.counts = $counts, r.message = $message
