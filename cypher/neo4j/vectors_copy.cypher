// vectors_copy: append vector rows (the caller deleted the same keys first in the same transaction).
// writes: Vector nodes. parameters: $rows (key, owner, kind, signal, embedder, input_hash, dim, vec as float32
// bytes). Not safe to re-run alone (the key is unique): always after vectors_delete_keys.
UNWIND $rows AS r
CREATE (:Vector {key: r.key, owner: r.owner, kind: r.kind, signal: r.signal, embedder: r.embedder,
                 input_hash: r.input_hash, dim: r.dim, vec: r.vec})
