// store_tables: the node labels in a Neo4j database (the counterpart of the embedded engine's table list).
// reads: the label catalogue. parameters: none. read-only.
CALL db.labels() YIELD label
RETURN label AS name
ORDER BY name
