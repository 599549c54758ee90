// vectors_read_keys: vectors for the given keys, in owner order.
// reads: Vector. parameters: $keys. read-only.
MATCH (v:Vector) WHERE v.key IN $keys
RETURN v.owner AS owner, v.input_hash AS input_hash, v.embedder AS embedder, v.dim AS dim, v.vec AS vec
ORDER BY owner
