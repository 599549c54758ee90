// items_upsert: create or update item nodes in bulk.
// writes: Item. parameters: $rows (uid, source, item_key, title, attributes as JSON text), $now (ISO time).
// safe to re-run: first_seen is kept, last_seen moves.
UNWIND $rows AS r
MERGE (i:Item {uid: r.uid})
ON CREATE SET i.first_seen = $now
SET i.source = r.source, i.item_key = r.item_key, i.title = r.title, i.attributes = r.attributes,
    i.last_seen = $now
