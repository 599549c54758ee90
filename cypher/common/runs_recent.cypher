// runs_recent: the latest job executions, newest first. reads: Run. parameters: $limit. read-only.
MATCH (r:Run)
RETURN r.id AS id, r.job AS job, r.started_at AS started_at, r.finished_at AS finished_at, r.status AS status,
       r.counts AS counts, r.message AS message
ORDER BY r.started_at DESC, r.id DESC
LIMIT $limit
