// rollup_items: the source of each item that passes the attribute filter, one row per item (the rollup's
// fallback when rollup_item_runs finds runs with gaps).
// reads: Item. writes: nothing. read-only, safe to re-run.
// parameters: $attributes (substrings of the attribute JSON that must all occur; ['{'] = no filter).
MATCH (i:Item)
WHERE all(a IN $attributes WHERE i.attributes CONTAINS a)
RETURN id(i) AS item, i.source AS source
