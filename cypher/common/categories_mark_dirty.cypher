// categories_mark_dirty: categories that received items and must have them placed.
// writes: Category.place_dirty. parameters: $uids. safe to re-run.
MATCH (c:Category) WHERE c.uid IN $uids SET c.place_dirty = true
