// scheme_get: one scheme by key. reads: Scheme. parameters: $key. read-only.
MATCH (s:Scheme {key: $key})
RETURN s.key AS key, s.role AS role, s.title AS title, s.iri AS iri, s.version AS version,
       s.source_file AS source_file, s.content_hash AS content_hash, s.ingested_at AS ingested_at,
       s.reader_options AS reader_options
