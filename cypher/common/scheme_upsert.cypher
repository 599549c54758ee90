// scheme_upsert: create or update one Scheme node.
// writes: Scheme. parameters: $key, $role, $title, $iri, $version, $source_file, $content_hash, $ingested_at,
// $reader_options (JSON text: format and reader options of a source).
// safe to re-run.
MERGE (s:Scheme {key: $key})
SET s.role = $role, s.title = $title, s.iri = $iri, s.version = $version, s.source_file = $source_file,
    s.content_hash = $content_hash, s.ingested_at = $ingested_at, s.reader_options = $reader_options
