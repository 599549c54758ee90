// count_nodes: node counts per table and scheme. reads: Concept, Category, Item. parameters: none. read-only.
MATCH (n:Concept) RETURN 'Concept' AS kind, n.scheme AS scheme, count(*) AS n
UNION ALL
MATCH (n:Category) RETURN 'Category' AS kind, n.scheme AS scheme, count(*) AS n
UNION ALL
MATCH (n:Item) RETURN 'Item' AS kind, n.source AS scheme, count(*) AS n
