"""The model file: versioned msgpack, validated before use.

Layout: a msgpack map {"format": "calami-model", "version": N,
"header": {...}, "payload": <bytes>}.  The header says when and from what
the model was built and carries the SHA-256 of the payload; the payload is
itself msgpack whose large arrays are zlib-compressed little-endian machine
arrays (decompressed straight into ``array`` objects, no per-item parsing).
Every way a file can be wrong ends in one ModelError line.
"""

from __future__ import annotations

import hashlib
import sys
import zlib
from array import array
from pathlib import Path
from typing import Any

import msgpack

from calami.errors import ModelError

FORMAT = "calami-model"
# 2: trigram language model with a <code> unit (1 was the bigram model).
VERSION = 2


def pack_array(a: array) -> dict[str, Any]:
    data = a
    if sys.byteorder != "little":
        data = array(a.typecode, a)
        data.byteswap()
    return {"t": a.typecode, "z": zlib.compress(data.tobytes(), 6)}


def unpack_array(d: dict[str, Any]) -> array:
    a = array(d["t"])
    a.frombytes(zlib.decompress(d["z"]))
    if sys.byteorder != "little":
        a.byteswap()
    return a


def pack_bytes(b: bytes) -> bytes:
    return zlib.compress(b, 6)


def unpack_bytes(b: bytes) -> bytes:
    return zlib.decompress(b)


def pack_strings(items: list[str]) -> bytes:
    """A list of strings without newlines, as one compressed blob."""
    return zlib.compress("\n".join(items).encode("utf-8"), 6)


def unpack_strings(b: bytes) -> list[str]:
    text = zlib.decompress(b).decode("utf-8")
    return text.split("\n") if text else []


def write_model(path: Path, header: dict[str, Any], payload: dict[str, Any]) -> int:
    """Write atomically; returns the file size in bytes."""
    body = msgpack.packb(payload, use_bin_type=True)
    header = dict(header, sha256=hashlib.sha256(body).hexdigest(), payload_bytes=len(body))
    blob = msgpack.packb({"format": FORMAT, "version": VERSION, "header": header, "payload": body}, use_bin_type=True)
    tmp = path.with_suffix(path.suffix + ".tmp")
    path.parent.mkdir(parents=True, exist_ok=True)
    with open(tmp, "wb") as fh:
        fh.write(blob)
    tmp.replace(path)
    return len(blob)


def read_model(path: Path) -> tuple[dict[str, Any], dict[str, Any]]:
    """Return (header, payload) or raise ModelError with a one-line reason."""
    try:
        raw = path.read_bytes()
    except FileNotFoundError:
        raise ModelError(f"model file not found at {path}; reinstall calami, or point CALAMI_MODEL (or `calami serve --model`) at a model file") from None
    except OSError as exc:
        raise ModelError(f"cannot read model file {path}: {exc.strerror or exc}") from None
    try:
        outer = msgpack.unpackb(raw, raw=False, strict_map_key=False)
    except Exception:
        raise ModelError(f"model file {path} is truncated or corrupt (not a calami model); rebuild it with 'calami model build' or reinstall calami") from None
    if not isinstance(outer, dict) or outer.get("format") != FORMAT:
        raise ModelError(f"{path} is not a calami model file")
    version = outer.get("version")
    if isinstance(version, int) and version < VERSION:
        raise ModelError(f"model file {path} is in an older format (version {version}, this calami reads {VERSION}); "
                         "rebuild it with 'calami model build' or reinstall calami")
    if version != VERSION:
        raise ModelError(f"model file {path} has format version {version}, this calami reads version {VERSION}; install a matching model")
    header, body = outer.get("header"), outer.get("payload")
    if not isinstance(header, dict) or not isinstance(body, bytes):
        raise ModelError(f"model file {path} is corrupt (missing header or payload)")
    if hashlib.sha256(body).hexdigest() != header.get("sha256"):
        raise ModelError(f"model file {path} is corrupt (checksum mismatch); reinstall calami or rebuild the model")
    try:
        payload = msgpack.unpackb(body, raw=False, strict_map_key=False)
    except Exception:
        raise ModelError(f"model file {path} is corrupt (payload does not decode)") from None
    return header, payload
