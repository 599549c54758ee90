"""Embedders: turn labels, paths and titles into unit vectors (static default, lexical, transformer)."""
