"""Match: rank reference concepts for each source category and write scored MAPS_TO edges."""
