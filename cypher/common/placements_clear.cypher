// placements_clear: drop the placements that came through some categories (before re-placing their items).
// writes: deletes PLACED_IN. parameters: $uids (category uids). safe to re-run.
MATCH (:Item)-[p:PLACED_IN]->(:Concept) WHERE p.via IN $uids DELETE p
