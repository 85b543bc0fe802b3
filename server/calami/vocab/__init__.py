"""calami.vocab."""
