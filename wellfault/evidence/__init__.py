"""Evidence of fault cuts in one well: tops and curves against the column, each jump measured into a fault cut, and the one-well analysis."""
