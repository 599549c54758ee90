// review_category_get: one category by uid, retired or not. reads: Category. parameters: $uid. read-only.
MATCH (c:Category {uid: $uid})
RETURN c.uid AS uid, c.scheme AS source, c.code AS code, c.label AS label, c.path AS path, c.depth AS depth,
       c.retired AS retired
