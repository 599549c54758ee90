// categories_broader_clear: drop the parent links of some categories before they are rewritten.
// writes: deletes BROADER edges. parameters: $uids. safe to re-run.
MATCH (c:Category)-[b:BROADER]->(:Category) WHERE c.uid IN $uids DELETE b
