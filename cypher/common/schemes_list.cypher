// schemes_list: every scheme. reads: Scheme. parameters: none. read-only.
MATCH (s:Scheme)
RETURN s.key AS key, s.role AS role, s.title AS title, s.version AS version, s.ingested_at AS ingested_at
ORDER BY s.role, s.key
