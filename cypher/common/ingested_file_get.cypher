// ingested_file_get: whether a source already took in a file with this content hash.
// reads: IngestedFile. parameters: $key (source + hash). read-only.
MATCH (f:IngestedFile {key: $key}) RETURN f.file AS file, f.rows AS rows, f.ingested_at AS ingested_at
