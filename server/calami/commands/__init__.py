"""One module per CLI command; see calami.cli."""
