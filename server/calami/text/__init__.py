"""calami.text."""
