"""Query: what analysts ask of the combined data, by reference concept, returned as DataFrames."""
