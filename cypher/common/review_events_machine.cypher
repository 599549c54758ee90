// review_events_machine: every event of some categories' edges (a new run compares its proposals with the newest
// one per edge, so it records only what changed). reads: EdgeEvent. parameters: $uids (category uids). read-only.
MATCH (e:EdgeEvent)
WHERE e.category IN $uids
RETURN e.category AS category, e.concept AS concept, e.action AS action, e.status AS status, e.score AS score,
       e.rank AS rank, e.at AS at, e.seq AS seq
