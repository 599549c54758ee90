// vector_index: an approximate-nearest-neighbour index over concept vectors (float lists on ConceptVector).
// reads: nothing. writes: one index. parameters: none. safe to re-run (IF NOT EXISTS).
// No fixed dimension, so any embedder fits; that form needs Neo4j 5.23+ (older 5.x servers skip this file).
CREATE VECTOR INDEX graftwork_concept_vectors IF NOT EXISTS FOR (v:ConceptVector) ON v.embedding
OPTIONS {indexConfig: {`vector.similarity_function`: 'cosine'}};
