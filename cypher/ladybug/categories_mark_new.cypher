// categories_mark_new: categories that received items, whose new members wait for placing (their edges did not
// change, so the items placed before stay as they are). writes: Category.place_new. parameters: $uids.
// safe to re-run.
// LadybugDB 0.22 evaluates `x IN $list` by scanning the list for every row (measured: a 5,000-uid list over
// 300,000 nodes took 25 s), so this override looks each uid up by primary key instead (benchmarks/README.md).
UNWIND $uids AS u
MATCH (c:Category {uid: u}) SET c.place_new = true
