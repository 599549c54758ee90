// vectors_hashes: the owner, input hash and embedder id of every vector of one node kind and signal, without
// the vectors. reads: Vector. parameters: $kind, $signal. read-only.
// The embed job compares these to skip unchanged texts: one scan of three short columns, cheaper than a
// primary-key lookup per node (vectors_hashes_keys) when most nodes are asked for.
MATCH (v:Vector) WHERE v.kind = $kind AND v.signal = $signal
RETURN v.owner AS owner, v.input_hash AS input_hash, v.embedder AS embedder
