// maps_to_direction: how the engine stores MAPS_TO ('both' in stores made before it went forward only).
// reads: the catalog. parameters: none. read-only.
CALL table_info('MAPS_TO') RETURN DISTINCT storage_direction
