"""Diagnostics we serialise ourselves equal what lsprotocol's own converter makes of them."""

from __future__ import annotations

import sys
from pathlib import Path

from pygls.protocol import default_converter

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "lsp"))

from fake_checker import FakeChecker  # noqa: E402

from calami.lsp.diagnostics import compute, to_diagnostic, to_wire  # noqa: E402
from calami.lsp.documents import Document  # noqa: E402
from calami.lsp.positions import UTF8, UTF16  # noqa: E402
from calami.lsp.settings import Settings  # noqa: E402


def test_wire_json_equals_the_converters_json():
    # The reference is lsprotocol's cattrs converter (as pygls uses it): push and
    # pull both skip it for speed, so the JSON must be what it would have sent.
    converter = default_converter()
    text = "😀 teh wrold\r\nThey came form far away.\n\n# recieve ofen\n\n<!-- calami(hush-nxet) -->\n"  # a directive finding too
    for encoding in (UTF16, UTF8):
        doc = Document("file:///a.md", "markdown", 1, text, encoding, "markdown")
        settings = Settings()
        findings = compute(doc, text, 1, FakeChecker(), settings)
        assert len(findings) >= 5 and "directive" in {f.kind for f in findings}
        for finding in findings:
            assert to_wire(finding, doc, settings) == converter.unstructure(to_diagnostic(finding, doc, settings))
