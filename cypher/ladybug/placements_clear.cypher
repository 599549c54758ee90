// placements_clear: drop the placements that came through some categories (before re-placing their items).
// writes: deletes PLACED_IN. parameters: $uids (category uids). safe to re-run.
// A placement through category c is only ever made for an item filed under c (placements_create), so walking
// from c to its items finds every one of them.
// LadybugDB 0.22 evaluates `x IN $list` by scanning the list for every row (measured: a 5,000-uid list over
// 300,000 nodes took 25 s), so this override looks each uid up by primary key instead (benchmarks/README.md).
// The items are gathered first, then their placements walked: as one pattern the engine took 0.6-0.7 s for 250
// categories (8,730 placements, 1M items), this way 0.2-0.4 s.
UNWIND $uids AS u
WITH DISTINCT u
MATCH (c:Category {uid: u})<-[:FILED_UNDER]-(i:Item)
WITH DISTINCT i, u
MATCH (i)-[p:PLACED_IN]->(:Concept)
WHERE p.via = u
DELETE p
