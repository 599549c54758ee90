// concepts_broader_clear: drop the parent links of some concepts before they are rewritten.
// writes: deletes BROADER edges. parameters: $uids. safe to re-run.
MATCH (c:Concept)-[b:BROADER]->(:Concept) WHERE c.uid IN $uids DELETE b
