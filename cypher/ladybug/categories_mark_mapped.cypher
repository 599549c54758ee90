// categories_mark_mapped: record what each category was last mapped with, and that its items need placing.
// writes: Category.mapped_with, Category.place_dirty. parameters: $rows (uid, tag). Run in the same
// transaction as the edges it describes. safe to re-run.
LOAD FROM $rows
MATCH (c:Category {uid: uid})
SET c.mapped_with = tag, c.place_dirty = true
