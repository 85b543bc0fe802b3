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
