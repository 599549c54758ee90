// vectors_read: every vector of one node kind and signal, in owner order.
// reads: Vector. parameters: $kind, $signal. read-only.
MATCH (v:Vector) WHERE v.kind = $kind AND v.signal = $signal
RETURN v.owner AS owner, v.input_hash AS input_hash, v.embedder AS embedder, v.dim AS dim, v.vec AS vec
ORDER BY owner
