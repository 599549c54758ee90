// audit_items: every item with its content fields (no first/last seen times), for a canonical export (tests).
// reads: Item. writes: nothing. parameters: none. read-only, safe to re-run.
MATCH (i:Item)
RETURN i.uid AS uid, i.source AS source, i.item_key AS item_key, i.title AS title, i.attributes AS attributes
ORDER BY uid
