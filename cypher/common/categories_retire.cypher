// categories_retire: mark categories that vanished from a source file (items and decisions are kept).
// writes: Category.retired. parameters: $uids. safe to re-run.
MATCH (c:Category) WHERE c.uid IN $uids SET c.retired = true
