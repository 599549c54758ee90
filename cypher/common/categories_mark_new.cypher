// categories_mark_new: categories that received items, whose new members wait for placing (their edges did not
// change, so the items placed before stay as they are). writes: Category.place_new. parameters: $uids.
// safe to re-run.
MATCH (c:Category) WHERE c.uid IN $uids SET c.place_new = true
