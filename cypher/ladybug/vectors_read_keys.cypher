// vectors_read_keys: vectors for the given keys, in owner order.
// reads: Vector. parameters: $keys. read-only.
// LadybugDB 0.22 evaluates `x IN $list` by scanning the list for every row (measured: a 5,000-uid list over
// 300,000 nodes took 25 s), so this override looks each uid up by primary key instead (benchmarks/README.md).
UNWIND $keys AS key
MATCH (v:Vector {key: key})
RETURN v.owner AS owner, v.input_hash AS input_hash, v.embedder AS embedder, v.dim AS dim, v.vec AS vec
ORDER BY owner
