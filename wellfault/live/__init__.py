"""While drilling: the well watcher, its events, the path ahead and the growing file it reads."""
