"""Names a project declares about itself: its package name and its dependencies.

Read from the manifests at a project's root (pyproject.toml, setup.cfg,
package.json, Cargo.toml).  They feed the workspace vocabulary: a project's
docs name the project and the tools it depends on far more often than any
word list knows them.  A broken manifest gives no names, never an error:
the project's own tools report those.
"""

from __future__ import annotations

import configparser
import json
import re
import tomllib
from pathlib import Path
from typing import Any, Iterable

MANIFESTS = ("pyproject.toml", "setup.cfg", "package.json", "Cargo.toml")
_REQUIREMENT_NAME = re.compile(r"^\s*([A-Za-z0-9][A-Za-z0-9._\-]*)")


def _requirement_names(items: Iterable[Any]) -> list[str]:
    out = []
    for item in items:
        if isinstance(item, str):
            m = _REQUIREMENT_NAME.match(item)
            if m:
                out.append(m.group(1))
    return out


def _from_pyproject(data: dict[str, Any]) -> list[str]:
    names: list[str] = []
    project = data.get("project")
    if isinstance(project, dict):
        if isinstance(project.get("name"), str):
            names.append(project["name"])
        names += _requirement_names(project.get("dependencies") or [])
        optional = project.get("optional-dependencies")
        if isinstance(optional, dict):
            for group, items in optional.items():
                names.append(str(group))
                if isinstance(items, list):
                    names += _requirement_names(items)
        scripts = project.get("scripts")
        if isinstance(scripts, dict):
            names += [str(k) for k in scripts]
    poetry = (data.get("tool") or {}).get("poetry") if isinstance(data.get("tool"), dict) else None
    if isinstance(poetry, dict):
        if isinstance(poetry.get("name"), str):
            names.append(poetry["name"])
        for table in ("dependencies", "dev-dependencies"):
            if isinstance(poetry.get(table), dict):
                names += [str(k) for k in poetry[table]]
    return names


def _from_setup_cfg(text: str) -> list[str]:
    parser = configparser.ConfigParser(interpolation=None)
    parser.read_string(text)
    names: list[str] = []
    if parser.has_option("metadata", "name"):
        names.append(parser.get("metadata", "name"))
    if parser.has_option("options", "install_requires"):
        names += _requirement_names(parser.get("options", "install_requires").splitlines())
    return names


def _from_package_json(data: dict[str, Any]) -> list[str]:
    names: list[str] = []
    if isinstance(data.get("name"), str):
        names.append(data["name"].split("/")[-1])
    for table in ("dependencies", "devDependencies", "peerDependencies"):
        if isinstance(data.get(table), dict):
            names += [k.split("/")[-1] for k in data[table]]
    return names


def _from_cargo(data: dict[str, Any]) -> list[str]:
    names: list[str] = []
    package = data.get("package")
    if isinstance(package, dict) and isinstance(package.get("name"), str):
        names.append(package["name"])
    for table in ("dependencies", "dev-dependencies", "build-dependencies"):
        if isinstance(data.get(table), dict):
            names += [str(k) for k in data[table]]
    return names


def manifest_names(path: Path, text: str) -> list[str]:
    """Names declared in one manifest file (empty when it cannot be parsed)."""
    try:
        if path.name == "pyproject.toml":
            return _from_pyproject(tomllib.loads(text))
        if path.name == "Cargo.toml":
            return _from_cargo(tomllib.loads(text))
        if path.name == "package.json":
            data = json.loads(text)
            return _from_package_json(data) if isinstance(data, dict) else []
        if path.name == "setup.cfg":
            return _from_setup_cfg(text)
    except (ValueError, configparser.Error, tomllib.TOMLDecodeError, RecursionError):
        return []
    return []
