"""Geometry of a well and its beds: units, the well, trajectory, attitude equations, slip, bed dip and the reference column."""
