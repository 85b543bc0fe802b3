"""calami.lsp."""
