// categories_mark_dirty: categories that received items and must have them placed.
// writes: Category.place_dirty. parameters: $uids. safe to re-run.
// LadybugDB 0.22 evaluates `x IN $list` by scanning the list for every row (measured: a 5,000-uid list over
// 300,000 nodes took 25 s), so this override looks each uid up by primary key instead (benchmarks/README.md).
UNWIND $uids AS u
MATCH (c:Category {uid: u}) SET c.place_dirty = true
