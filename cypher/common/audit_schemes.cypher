// audit_schemes: every scheme with its content fields (no times), for a canonical export of the graph (tests).
// reads: Scheme. writes: nothing. parameters: none. read-only, safe to re-run.
MATCH (s:Scheme)
RETURN s.key AS key, s.role AS role, s.title AS title, s.iri AS iri, s.version AS version,
       s.content_hash AS content_hash, s.reader_options AS reader_options
ORDER BY key
