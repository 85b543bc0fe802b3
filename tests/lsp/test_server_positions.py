"""Positions in UTF-16 (default) and UTF-8 (when offered) with wide characters before a finding."""

from __future__ import annotations

import pytest
from lsprotocol import types

from calami.lsp.positions import UTF8, UTF16, PositionMap, column_to_units, units_to_column
from session import capabilities, edit, open_doc, published_for, start, stop, until

# What comes before "teh" on the line, and its length in UTF-16 / UTF-8 code
# units (counts from the Unicode encoding forms: an astral character is a
# surrogate pair in UTF-16 and 4 bytes in UTF-8; CJK ideographs are 3 bytes;
# U+0301 COMBINING ACUTE ACCENT is one BMP code point, 2 bytes in UTF-8).
PREFIXES = [
    ("😀 ", 3, 5),
    ("漢字 ", 3, 7),
    ("cafe\u0301 ", 6, 7),
    ("😀漢e\u0301 ", 6, 11),
]


@pytest.mark.parametrize("prefix, utf16, utf8", PREFIXES)
def test_column_conversions(prefix, utf16, utf8):
    line = prefix + "teh"
    col = len(prefix)
    assert column_to_units(line, col, UTF16) == utf16
    assert column_to_units(line, col, UTF8) == utf8
    assert units_to_column(line, utf16, UTF16) == col
    assert units_to_column(line, utf8, UTF8) == col


def test_a_column_inside_a_surrogate_pair_snaps_to_the_character():
    assert units_to_column("😀x", 1, UTF16) == 0
    assert units_to_column("😀x", 2, UTF16) == 1
    assert PositionMap("ab\r\ncd", UTF16).offset(types.Position(0, 99)) == 2  # past the end: end of line
    assert PositionMap("ab\r\ncd", UTF16).offset(types.Position(9, 0)) == 6  # past the last line: end


@pytest.mark.parametrize("encodings, expected, column_index", [(None, "utf-16", 1), (["utf-16", "utf-8"], "utf-8", 2)])
async def test_diagnostic_ranges_in_the_negotiated_encoding(tmp_path, encodings, expected, column_index):
    client, result = await start(tmp_path / "profile", [tmp_path], caps=capabilities(encodings=encodings),
                                 options={"debounceMs": 0})
    try:
        assert result.capabilities.position_encoding == expected
        text = "\n".join(prefix + "teh end" for prefix, *_ in PREFIXES) + "\n"
        uri = open_doc(client, tmp_path / "wide.md", text)
        params = await until(lambda: published_for(client, uri, 1))
        starts = sorted((d.range.start.line, d.range.start.character, d.range.end.character) for d in params.diagnostics)
        assert starts == [(i, row[column_index], row[column_index] + 3) for i, row in enumerate(PREFIXES)]
        # An edit addressed in the same units lands where the client meant it.
        line, units = 0, PREFIXES[0][column_index]
        edit(client, uri, 2, (line, units), (line, units + 3), "the")
        params = await until(lambda: published_for(client, uri, 2))
        assert len(params.diagnostics) == len(PREFIXES) - 1
    finally:
        await stop(client)
