// meta_get: one store-level setting. reads: Meta. parameters: $key. read-only.
MATCH (m:Meta {key: $key}) RETURN m.value AS value
