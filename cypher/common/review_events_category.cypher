// review_events_category: the whole history of one category's edges, oldest first, with concept codes.
// reads: EdgeEvent, Concept. parameters: $category (uid). read-only.
MATCH (e:EdgeEvent)
WHERE e.category = $category
OPTIONAL MATCH (k:Concept {uid: e.concept})
RETURN e.at AS at, e.seq AS seq, e.action AS action, e.concept AS concept, k.code AS concept_code,
       k.pref_label AS concept_label, e.status_before AS status_before, e.status AS status, e.score AS score,
       e.rank AS rank, e.run_id AS run_id, e.actor AS actor, e.note AS note
ORDER BY at, seq
