// items_insert: bulk-append items that are not in the store yet (the caller checked with items_existing).
// writes: Item. parameters: $rows (uid, source, item_key, title, attributes, first_seen, last_seen), in the
// Item table's column order. NOT safe to re-run by itself: COPY rejects a uid already present, so the caller
// runs it in the same transaction as its existence check.
COPY Item FROM $rows
