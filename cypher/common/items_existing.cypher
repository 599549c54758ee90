// items_existing: which of some item uids are already in the store (to split a batch into new and known items).
// reads: Item. parameters: $uids (item uids). read-only.
MATCH (i:Item) WHERE i.uid IN $uids
RETURN i.uid AS uid
