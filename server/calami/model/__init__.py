"""calami.model."""
