// concepts_retire: mark concepts that vanished from a new version of the reference file.
// writes: Concept.retired. parameters: $uids. safe to re-run.
MATCH (c:Concept) WHERE c.uid IN $uids SET c.retired = true
