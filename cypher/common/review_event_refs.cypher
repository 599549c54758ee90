// review_event_refs: which decision references were already applied (so an imported sheet or a queued decision
// is never applied twice). reads: EdgeEvent. parameters: $refs (list). read-only.
MATCH (e:EdgeEvent)
WHERE e.ref IN $refs
RETURN DISTINCT e.ref AS ref
