"""Ingest: read reference hierarchies, source taxonomies and items from files into plain records, then the graph."""
