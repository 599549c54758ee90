// review_events_hashes: the concept content hash each edge event saw, for the edges of some sources (to tell
// which live edges point at a concept that changed since). reads: EdgeEvent.
// parameters: $sources (list; empty = all). read-only.
MATCH (e:EdgeEvent)
WHERE (size($sources) = 0 OR e.source IN $sources) AND e.concept_hash <> ''
RETURN e.category AS category, e.concept AS concept, e.at AS at, e.seq AS seq, e.action AS action,
       e.concept_hash AS concept_hash
