"""graftwork: a maintained crosswalk from many source taxonomies onto one reference hierarchy, in a graph."""

__version__ = "0.1.0"
