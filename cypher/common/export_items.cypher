// export_items: every item of some sources with its placements on one reference (one row per placement; an item
// with none has one row with empty placement fields), for the items export (CSV, Parquet).
// reads: Item, PLACED_IN, Concept. writes: nothing. read-only, safe to re-run.
// parameters: $reference, $sources ([] = all), $statuses (placements that count).
MATCH (i:Item)
WHERE size($sources) = 0 OR i.source IN $sources
OPTIONAL MATCH (i)-[p:PLACED_IN]->(k:Concept)
WHERE k.scheme = $reference AND p.status IN $statuses
RETURN i.uid AS item_uid, i.source AS source, i.item_key AS item_key, i.title AS title,
       i.attributes AS attributes, p.via AS via, p.status AS status, p.score AS score, k.code AS concept_code
ORDER BY source, item_key, concept_code
