// audit_edge_events: the review history of MAPS_TO edges without ids and times, for a canonical export (tests).
// reads: EdgeEvent. writes: nothing. parameters: none. read-only, safe to re-run.
MATCH (e:EdgeEvent)
RETURN e.action AS action, e.source AS source, e.category AS category, e.concept AS concept, e.status AS status,
       e.status_before AS status_before, e.actor AS actor, e.note AS note
