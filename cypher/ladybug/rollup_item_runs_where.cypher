// rollup_item_runs_where: rollup_item_runs over only the items whose attribute JSON holds every pattern.
// reads: Item. writes: nothing. read-only, safe to re-run.
// parameters: $block; $attributes (substrings of the item's attribute JSON that must all occur).
MATCH (i:Item)
WHERE all(a IN $attributes WHERE i.attributes CONTAINS a)
WITH i.source AS source, offset(id(i)) AS key
RETURN source, key / $block AS block, min(key) AS lo, max(key) AS hi, count(*) AS n
