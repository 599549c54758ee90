// rollup_item_runs: the source of every item, told by runs of item keys: per source and block of $block keys,
// the lowest and highest key and how many items. A run whose count fills its range holds only that source's
// items, so the rollup needs no per-item row; when a run has gaps it asks rollup_items instead.
// reads: Item. writes: nothing. parameters: $block (keys per block, e.g. 1024). read-only, safe to re-run.
// No attribute filter here: every stored attribute text is a JSON object (items_job), so query_rollup's '{'
// test passes them all; rollup_item_runs_where filters.
MATCH (i:Item)
WITH i.source AS source, id(i) AS key
RETURN source, key / $block AS block, min(key) AS lo, max(key) AS hi, count(*) AS n
