// items_attributes: the stored attributes (JSON text) of some items, to merge a continuation batch into them.
// reads: Item. parameters: $uids (item uids). read-only.
// Primary-key lookups per uid: LadybugDB evaluates `x IN $list` by scanning the list for every row.
UNWIND $uids AS u
MATCH (i:Item {uid: u})
RETURN i.uid AS uid, i.attributes AS attributes
