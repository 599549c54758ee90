// edges_mark_stale: decisions that point to concepts which vanished or moved in a reference upgrade go back to
// review. writes: MAPS_TO.status. parameters: $uids (concept uids). safe to re-run.
MATCH (:Category)-[m:MAPS_TO]->(k:Concept)
WHERE k.uid IN $uids AND m.status = 'accepted'
SET m.status = 'stale'
