"""Shared fixtures: the shipped model (loaded once) and a checker on it."""

from __future__ import annotations

from pathlib import Path

import pytest

REPO = Path(__file__).resolve().parents[1]


@pytest.fixture(scope="session")
def model():
    from calami.model import load

    return load()


@pytest.fixture(scope="session")
def checker(model):
    from calami.checker import Checker

    return Checker(model)


@pytest.fixture(scope="session")
def repo_root() -> Path:
    return REPO


def pytest_collection_modifyitems(config, items):
    """Tests marked ``slow`` run only when asked for (``-m slow``, or ``-m hooks`` for the hook tests)."""
    expression = config.getoption("markexpr") or ""
    if "slow" in expression or "hooks" in expression:
        return
    skip = pytest.mark.skip(reason="slow: run with -m slow")
    for item in items:
        if "slow" in item.keywords:
            item.add_marker(skip)
