// ingested_file_record: note that a source took in a whole file (written after its last batch committed).
// writes: IngestedFile. parameters: $key, $source, $file, $content_hash, $rows, $rejected, $run_id, $ingested_at.
// safe to re-run.
MERGE (f:IngestedFile {key: $key})
SET f.source = $source, f.file = $file, f.content_hash = $content_hash, f.rows = $rows, f.rejected = $rejected,
    f.run_id = $run_id, f.ingested_at = $ingested_at
