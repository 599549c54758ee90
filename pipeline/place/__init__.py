"""Place: materialise PLACED_IN from items through the live MAPS_TO edges of their categories."""
