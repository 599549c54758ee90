// items_any_of_source: one item of a source, if it has any (a source with none takes its first file by bulk copy
// alone, with no per-batch existence check).
// reads: Item. parameters: $source (source key). read-only.
MATCH (i:Item)
WHERE i.source = $source
RETURN i.uid AS uid
LIMIT 1
