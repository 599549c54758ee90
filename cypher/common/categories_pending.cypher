// categories_pending: each live category of a source with what it was last mapped with and whether its items
// wait for placing (place_dirty: all of them, through changed edges; place_new: only members not yet placed).
// reads: Category. parameters: $scheme. read-only.
MATCH (c:Category) WHERE c.scheme = $scheme AND c.retired = false
RETURN c.uid AS uid, c.content_hash AS content_hash, c.mapped_with AS mapped_with, c.place_dirty AS place_dirty,
       c.place_new AS place_new
ORDER BY uid
