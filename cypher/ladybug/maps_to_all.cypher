// maps_to_all: every MAPS_TO edge with all its properties, in the column order COPY MAPS_TO takes them.
// reads: Category, MAPS_TO, Concept. parameters: none. read-only. Used to rebuild the table forward only.
MATCH (a:Category)-[m:MAPS_TO]->(b:Concept)
RETURN a.uid AS from_uid, b.uid AS to_uid, m.score AS score, m.rank AS rank, m.match_type AS match_type,
       m.status AS status, m.method AS method, m.evidence AS evidence, m.run_id AS run_id,
       m.decided_by AS decided_by, m.decided_at AS decided_at, m.note AS note
