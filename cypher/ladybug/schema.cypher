// schema: creates every table graftwork uses in an embedded LadybugDB store.
// reads: nothing. writes: table definitions only. parameters: none. safe to re-run (IF NOT EXISTS).
// Vectors live in their own table (Vector) because updating a list property with SET is slow on this engine;
// a vector table is rewritten in bulk with COPY instead (see ENGINES.md). Vectors are raw float32 bytes (BLOB):
// variable-length FLOAT[] columns lost mostly-zero vectors on COPY in ladybug 0.22 (tests/test_store_vectors.py).
CREATE NODE TABLE IF NOT EXISTS Meta(key STRING, value STRING, PRIMARY KEY(key));
CREATE NODE TABLE IF NOT EXISTS Scheme(key STRING, role STRING, title STRING, iri STRING, version STRING,
    source_file STRING, content_hash STRING, ingested_at STRING, reader_options STRING, PRIMARY KEY(key));
CREATE NODE TABLE IF NOT EXISTS IngestedFile(key STRING, source STRING, file STRING, content_hash STRING,
    rows INT64, rejected INT64, run_id STRING, ingested_at STRING, PRIMARY KEY(key));
CREATE NODE TABLE IF NOT EXISTS Concept(uid STRING, scheme STRING, code STRING, iri STRING, pref_label STRING,
    alt_labels STRING[], definition STRING, path STRING, depth INT64, is_leaf BOOLEAN, deprecated BOOLEAN,
    retired BOOLEAN, content_hash STRING, PRIMARY KEY(uid));
CREATE NODE TABLE IF NOT EXISTS Category(uid STRING, scheme STRING, code STRING, label STRING, path STRING,
    depth INT64, is_leaf BOOLEAN, retired BOOLEAN, content_hash STRING, mapped_with STRING, place_dirty BOOLEAN,
    place_new BOOLEAN, PRIMARY KEY(uid));
// place_new came after the first stores were made: an older store gains it here (a no-op on a new one).
ALTER TABLE Category ADD IF NOT EXISTS place_new BOOLEAN;
CREATE NODE TABLE IF NOT EXISTS Item(uid STRING, source STRING, item_key STRING, title STRING, attributes STRING,
    first_seen STRING, last_seen STRING, PRIMARY KEY(uid));
CREATE NODE TABLE IF NOT EXISTS Run(id STRING, job STRING, started_at STRING, finished_at STRING, status STRING,
    parameters STRING, counts STRING, message STRING, PRIMARY KEY(id));
CREATE NODE TABLE IF NOT EXISTS Vector(key STRING, owner STRING, kind STRING, signal STRING, embedder STRING,
    input_hash STRING, dim INT64, vec BLOB, PRIMARY KEY(key));
CREATE REL TABLE IF NOT EXISTS BROADER(FROM Concept TO Concept, FROM Category TO Category);
CREATE REL TABLE IF NOT EXISTS FILED_UNDER(FROM Item TO Category);
// MAPS_TO is stored forward only. Stored both ways, the checkpoint after re-mapping a few dozen categories
// rewrote the concept-side adjacency of the whole table (1.1-1.5 s at 250k edges, every time); forward only,
// 0.2 s. A walk from a concept back along MAPS_TO scans the table instead (a few ms at 250k edges).
// PLACED_IN stays both ways: the rollup scans it from the concept side, 0.07 s against 0.26 s forward only
// (880k placements). Stores made before this gain the forward-only MAPS_TO on opening (ladybug_store.py).
CREATE REL TABLE IF NOT EXISTS MAPS_TO(FROM Category TO Concept, score DOUBLE, rank INT64, match_type STRING,
    status STRING, method STRING, evidence STRING, run_id STRING, decided_by STRING, decided_at STRING, note STRING)
    WITH (storage_direction = 'fwd');
CREATE REL TABLE IF NOT EXISTS PLACED_IN(FROM Item TO Concept, via STRING, score DOUBLE, status STRING);
// EdgeEvent: the append-only history of every MAPS_TO edge (proposed by a run, decided by a person, withdrawn,
// reopened); never updated or deleted (pipeline/review/events.py). Edges are named by their two end uids.
CREATE NODE TABLE IF NOT EXISTS EdgeEvent(id STRING, seq INT64, at STRING, action STRING, source STRING,
    category STRING, concept STRING, status STRING, status_before STRING, score DOUBLE, rank INT64, run_id STRING,
    actor STRING, note STRING, concept_hash STRING, ref STRING, PRIMARY KEY(id));
