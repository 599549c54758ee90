// items_upsert: create or update item nodes in bulk.
// writes: Item. parameters: $rows (uid, source, item_key, title, attributes as JSON text), $now (ISO time).
// safe to re-run: first_seen is kept, last_seen moves.
LOAD FROM $rows
MERGE (i:Item {uid: uid})
ON CREATE SET i.first_seen = $now
SET i.source = source, i.item_key = item_key, i.title = title, i.attributes = attributes, i.last_seen = $now
