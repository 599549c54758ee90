// schema: uniqueness constraints and lookup indexes graftwork uses in a Neo4j 5 database.
// reads: nothing. writes: constraints and indexes only. parameters: none. safe to re-run (IF NOT EXISTS).
// Each statement runs in its own transaction (schema commands cannot share one). Neo4j needs no declared
// properties; these mirror the key columns of cypher/ladybug/schema.cypher. The vector index is in vector_index.
CREATE CONSTRAINT graftwork_meta_key IF NOT EXISTS FOR (n:Meta) REQUIRE n.key IS UNIQUE;
CREATE CONSTRAINT graftwork_scheme_key IF NOT EXISTS FOR (n:Scheme) REQUIRE n.key IS UNIQUE;
CREATE CONSTRAINT graftwork_concept_uid IF NOT EXISTS FOR (n:Concept) REQUIRE n.uid IS UNIQUE;
CREATE CONSTRAINT graftwork_category_uid IF NOT EXISTS FOR (n:Category) REQUIRE n.uid IS UNIQUE;
CREATE CONSTRAINT graftwork_item_uid IF NOT EXISTS FOR (n:Item) REQUIRE n.uid IS UNIQUE;
CREATE CONSTRAINT graftwork_run_id IF NOT EXISTS FOR (n:Run) REQUIRE n.id IS UNIQUE;
CREATE CONSTRAINT graftwork_vector_key IF NOT EXISTS FOR (n:Vector) REQUIRE n.key IS UNIQUE;
CREATE CONSTRAINT graftwork_edge_event_id IF NOT EXISTS FOR (n:EdgeEvent) REQUIRE n.id IS UNIQUE;
CREATE INDEX graftwork_concept_scheme IF NOT EXISTS FOR (n:Concept) ON (n.scheme);
CREATE INDEX graftwork_category_scheme IF NOT EXISTS FOR (n:Category) ON (n.scheme);
CREATE INDEX graftwork_item_source IF NOT EXISTS FOR (n:Item) ON (n.source);
CREATE INDEX graftwork_vector_kind_signal IF NOT EXISTS FOR (n:Vector) ON (n.kind, n.signal);
CREATE INDEX graftwork_vector_owner IF NOT EXISTS FOR (n:Vector) ON (n.owner);
CREATE INDEX graftwork_edge_event_category IF NOT EXISTS FOR (n:EdgeEvent) ON (n.category);
CREATE INDEX graftwork_run_started IF NOT EXISTS FOR (n:Run) ON (n.started_at);
CREATE INDEX graftwork_maps_to_status IF NOT EXISTS FOR ()-[m:MAPS_TO]-() ON (m.status);
CREATE INDEX graftwork_placed_in_via IF NOT EXISTS FOR ()-[p:PLACED_IN]-() ON (p.via);
