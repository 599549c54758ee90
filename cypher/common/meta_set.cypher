// meta_set: set one store-level setting. writes: Meta. parameters: $key, $value. safe to re-run.
MERGE (m:Meta {key: $key}) SET m.value = $value
