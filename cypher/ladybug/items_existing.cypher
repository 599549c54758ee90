// items_existing: which of some item uids are already in the store (to split a batch into new and known items).
// reads: Item. parameters: $uids (item uids). read-only.
// LadybugDB 0.22 evaluates `x IN $list` by scanning the list for every row (measured: a 5,000-uid list over
// 300,000 nodes took 25 s), so this override looks each uid up by primary key instead (benchmarks/README.md).
UNWIND $uids AS u
MATCH (i:Item {uid: u})
RETURN i.uid AS uid
