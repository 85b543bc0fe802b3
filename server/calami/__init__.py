"""calami: context-aware spelling hints for prose in any editor and in CI."""

__version__ = "0.1.0"
