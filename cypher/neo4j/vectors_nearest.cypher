// vectors_nearest: approximate nearest concept vectors of one signal for each query vector (vector index).
// reads: the vector index $index, Vector. parameters: $index, $queries (list of {i, vec}), $fetch (neighbours
// asked per query, before filtering by signal), $signal. read-only.
UNWIND $queries AS q
CALL db.index.vector.queryNodes($index, $fetch, q.vec) YIELD node, score
WITH q, node, score WHERE node.signal = $signal
RETURN q.i AS query, node.owner AS owner, score
ORDER BY query, score DESC, owner
