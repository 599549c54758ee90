// server_components: the server's kernel version and edition (checked when a store opens).
// reads: dbms.components(). parameters: none. read-only.
CALL dbms.components() YIELD name, versions, edition
WHERE name = 'Neo4j Kernel'
RETURN versions[0] AS version, edition
