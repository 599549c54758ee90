// vectors_hashes_keys: the input hash and embedder id of the vectors with the given keys, without the vectors.
// reads: Vector. parameters: $keys (list of vector keys). read-only.
// The embed job compares these to skip unchanged texts; leaving out `vec` saves reading ~1 KB per row.
// Primary-key lookups, not `v.key IN $keys` (list length x rows on LadybugDB 0.22, see vectors_read_keys).
UNWIND $keys AS key
MATCH (v:Vector {key: key})
RETURN v.owner AS owner, v.input_hash AS input_hash, v.embedder AS embedder
