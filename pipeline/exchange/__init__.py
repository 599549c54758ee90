"""Exchange: the crosswalk in and out of the store, in open formats."""
