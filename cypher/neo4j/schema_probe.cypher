// schema_probe: the graftwork schema version (null if none) and whether the database holds anything else.
// reads: Meta, any node (at most one). parameters: $key ('schema_version'). read-only.
OPTIONAL MATCH (m:Meta {key: $key})
WITH m.value AS version
OPTIONAL MATCH (n)
WITH version, n LIMIT 1
RETURN version, count(n) AS nodes
