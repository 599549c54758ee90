// evaluate_map_runs: finished runs of one job with their parameters, newest first (evaluation repeats the
// settings of the last map run when it re-maps for an ablation).
// reads: Run. parameters: $job, $limit. read-only.
MATCH (r:Run) WHERE r.job = $job AND r.status = 'ok'
RETURN r.id AS id, r.started_at AS started_at, r.parameters AS parameters
ORDER BY r.started_at DESC, r.id DESC
LIMIT $limit
