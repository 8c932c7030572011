"""Migration revisions, oldest first; each file's ``revision`` names it."""
