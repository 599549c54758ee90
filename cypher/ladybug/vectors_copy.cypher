// vectors_copy: bulk-append vector rows (the caller deleted the same keys first in the same transaction).
// writes: Vector nodes. parameters: $rows (Arrow table key, owner, kind, signal, embedder, input_hash, vec).
COPY Vector FROM $rows
