"""calami.text.formats."""
