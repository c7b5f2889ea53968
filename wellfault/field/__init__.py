"""A whole field: screening many wells, neighbour-aware thickness, cuts grouped into fault planes."""
