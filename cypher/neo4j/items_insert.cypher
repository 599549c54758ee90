// items_insert: create items that are not in the store yet (the caller checked with items_existing).
// writes: Item. parameters: $rows (uid, source, item_key, title, attributes, first_seen, last_seen).
// safe to re-run: MERGE on the uniqueness constraint (Neo4j has no faster append path over Bolt).
UNWIND $rows AS r
MERGE (i:Item {uid: r.uid})
ON CREATE SET i.first_seen = r.first_seen
SET i.source = r.source, i.item_key = r.item_key, i.title = r.title, i.attributes = r.attributes,
    i.last_seen = r.last_seen
