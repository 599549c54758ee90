// audit_meta: every store-level setting (schema version, embedder, learned priors and models).
// reads: Meta. writes: nothing. parameters: none. read-only, safe to re-run.
MATCH (m:Meta) RETURN m.key AS key, m.value AS value ORDER BY key
