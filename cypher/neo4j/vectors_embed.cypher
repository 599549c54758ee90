// vectors_embed: give concept vector rows a float list under the ConceptVector label (the vector index).
// writes: Vector.embedding, ConceptVector label. parameters: $rows (key, embedding). safe to re-run.
UNWIND $rows AS r
MATCH (v:Vector {key: r.key})
SET v:ConceptVector, v.embedding = r.embedding
