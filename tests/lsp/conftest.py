"""Fixtures shared by the end-to-end server tests."""

import pytest


@pytest.fixture
def folder(tmp_path):
    """A workspace folder; the .git marks the project root."""
    root = tmp_path / "proj"
    root.mkdir()
    (root / ".git").mkdir()
    return root
