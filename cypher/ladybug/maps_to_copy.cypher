// maps_to_copy: bulk-load MAPS_TO edges (from uid, to uid, then every property in table order).
// writes: MAPS_TO. parameters: $rows. NOT safe to re-run by itself: only into a table just created empty.
COPY MAPS_TO FROM $rows
