// category_member_sample_exact: the first $n member items (by item uid) of each live category of a source whose
// uid lies in [$lo, $hi], one row per item with its title; categories without items are absent.
// reads: Item, FILED_UNDER, Category. parameters: $scheme, $lo, $hi, $n. read-only.
// The slower, always exact form of category_member_sample, for uid ranges where that one reports odd items.
// list_slice is 1-based with an inclusive end.
MATCH (i:Item)-[:FILED_UNDER]->(c:Category)
WHERE c.scheme = $scheme AND c.retired = false AND c.uid >= $lo AND c.uid <= $hi
WITH c.uid AS uid, list_slice(list_sort(collect(i.uid)), 1, $n) AS firsts
UNWIND firsts AS iu
MATCH (j:Item {uid: iu})
RETURN uid, j.uid AS item, j.title AS title
ORDER BY uid, item
