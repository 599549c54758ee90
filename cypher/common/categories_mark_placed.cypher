// categories_mark_placed: the items of these categories are placed through their current edges.
// writes: Category.place_dirty, place_new. parameters: $uids. safe to re-run.
MATCH (c:Category) WHERE c.uid IN $uids SET c.place_dirty = false, c.place_new = false
