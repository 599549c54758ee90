// category_member_sample: for each live category of a source whose uid lies in [$lo, $hi] and that has items,
// its first $n member items by item uid, as "item uid" $sep "title" strings in that order (firsts), and how many
// of its items this form cannot split exactly (odd: a uid holding $sep, or a missing title).
// reads: Item, FILED_UNDER, Category. parameters: $scheme, $lo, $hi, $n, $sep, $nul (unused here). read-only.
// Sampling here returns at most $n titles per category instead of every item. (cypher/ladybug/ has the
// LadybugDB form, which sorts in a list instead.)
MATCH (i:Item)-[:FILED_UNDER]->(c:Category)
WHERE c.scheme = $scheme AND c.retired = false AND c.uid >= $lo AND c.uid <= $hi
WITH c.uid AS uid, i ORDER BY i.uid
WITH uid, collect(i.uid + $sep + i.title)[0..$n] AS firsts,
     count(CASE WHEN i.uid CONTAINS $sep OR i.title IS NULL THEN 1 END) AS odd
RETURN uid, firsts, odd
ORDER BY uid
