// audit_ingested_files: the durable "file taken in whole" marks, without run ids and times (tests).
// reads: IngestedFile. writes: nothing. parameters: none. read-only, safe to re-run.
MATCH (f:IngestedFile)
RETURN f.key AS key, f.source AS source, f.file AS file, f.content_hash AS content_hash, f.rows AS rows,
       f.rejected AS rejected
ORDER BY key
