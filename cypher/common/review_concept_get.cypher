// review_concept_get: one concept by uid, retired or not. reads: Concept. parameters: $uid. read-only.
MATCH (k:Concept {uid: $uid})
RETURN k.uid AS uid, k.scheme AS scheme, k.code AS code, k.pref_label AS label, k.path AS path,
       k.depth AS depth, k.retired AS retired, k.content_hash AS content_hash
