// concept_by_code: one concept of a reference scheme by its code. reads: Concept. parameters: $uid.
MATCH (k:Concept {uid: $uid})
RETURN k.uid AS uid, k.code AS code, k.pref_label AS label, k.depth AS depth, k.path AS path
