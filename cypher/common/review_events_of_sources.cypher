// review_events_of_sources: every event of the edges of some sources (a map run compares its proposals with the
// newest one per edge, so it records only what changed; the caller keeps the categories it re-mapped). One scan
// of EdgeEvent: a list of a few source keys, not of thousands of category uids (costly in an IN test).
// reads: EdgeEvent. parameters: $sources (source keys). read-only.
MATCH (e:EdgeEvent)
WHERE e.source IN $sources
RETURN e.category AS category, e.concept AS concept, e.action AS action, e.status AS status, e.score AS score,
       e.rank AS rank, e.at AS at, e.seq AS seq
