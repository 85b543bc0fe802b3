"""HTML documentation page -> paragraphs of English prose.

Documentation generators (Sphinx, DocBook, rustdoc, mdBook, Apache's and
Erlang's own) wrap a little prose in a lot of navigation, code and
signatures.  The language model must see only the prose, and must not see
two words as neighbours when code stood between them, so inline code is
replaced by CODE, a token the calami tokenizer classifies as technical.

Only the standard library's html.parser is used: the recipe must run on a
bare Debian Python.
"""

from __future__ import annotations

import re
import unicodedata
from html.parser import HTMLParser

CODE = "_code_"

# Elements whose whole content is never prose.
SKIP_TAGS = frozenset(
    "script style nav header footer aside pre form button select textarea noscript svg math head "
    "title dt iframe object template summary figure img map canvas video audio input label "
    "listing xmp samp-block".split()
)

# Inline elements standing for code: replaced by CODE, content dropped.
CODE_TAGS = frozenset("code tt kbd samp var".split())

# Elements that end one paragraph and start another.
BLOCK_TAGS = frozenset(
    "p li dd h1 h2 h3 h4 h5 h6 blockquote td th div section article main body caption figcaption "
    "br tr ul ol dl table details hr center address fieldset legend".split()
)

VOID_TAGS = frozenset("br hr img input meta link area base col embed param source track wbr".split())

# class / id tokens that mark navigation, signatures, code or boilerplate.
SKIP_TOKENS = frozenset(
    """
    sphinxsidebar sphinxsidebarwrapper related footer headerlink toc toctree-wrapper
    navheader navfooter breadcrumb breadcrumbs highlight sig sig-object sig-name sig-param
    code-header item-decl src srclink rightside since search searchbox
    bd-sidebar bd-sidebar-primary bd-sidebar-secondary bd-toc bd-header bd-footer prev-next-area
    prev-next-footer footer-article header-article navbar navbar-header version-switcher
    edit-this-page theme-switch-button copybtn copy-button linenodiv line-numbers doctest
    output_area output output_wrapper sphx-glr-script-out sphx-glr-download sphx-glr-download-link-note
    sphx-glr-thumbnails sphx-glr-thumbcontainer sphx-glr-timing sphx-glr-signature sphx-glr-footer
    refsynopsisdiv synopsis funcsynopsis cmdsynopsis programlisting screen indexterm viewcode-link
    math mathjax_preview anchor pilcrow permalink menu-bar nav-chapters nav-wrapper sidebar-scrollbox
    autosummary longtable-autosummary indextable genindextable modindextable contentstable
    dataframe directive module-summary quickview page-header path sidebar rustdoc-toc
    sidebar-elems sidebar-links search-form search-container mobile-topbar
    copyright searchbar search-wrapper top-nav bottom-nav nav-next nav-prev
    topbar leftnav left-column exports-tube func-head func-types-title fun-types rt-1
    title-anchors pencil-before paperclip-before ghlink-before pencil-after paperclip-after ghlink-after
    example example-erl example-none REFTYPES
    headerbar sidebar-toggle version-warning admonition-todo todo
    footnote-reference fn-backref brackets field-name classifier
    contents topic-contents local-toc toc-backref
    """.split()
)
SKIP_ROLES = frozenset("navigation search banner contentinfo complementary toolbar menu".split())

# Marks with nothing worth a placeholder (heading anchors, pilcrows).
SILENT_TOKENS = frozenset("headerlink anchor pilcrow permalink toplang bottomlang menu hd ft global-nav nav".split())
TABLE_SKIP_CLASSES = frozenset("directive module".split())

SKIP_MODE = 1  # dropped, paragraph goes on
CODE_MODE = 2  # dropped, CODE put in its place
GAP_MODE = 3  # technical inline material: dropped, CODE put in its place

# Classes whose inline element stands for code.
CODE_CLASSES = frozenset("pre literal xref math notranslate docutils-literal".split())

_WS = re.compile(r"\s+")
_CODE_RUN = re.compile(r"(?:_code_[\s,;:/]*){2,}")


class ProseParser(HTMLParser):
    """Collects prose paragraphs; skips whatever a SKIP rule marks."""

    def __init__(self) -> None:
        super().__init__(convert_charrefs=True)
        self.paragraphs: list[str] = []
        self._buf: list[str] = []
        self._stack: list[tuple[str, int]] = []  # (tag, mode)
        self._skip = 0  # depth of open skip/code elements

    # -- helpers -------------------------------------------------------
    def _flush(self) -> None:
        if self._buf:
            text = "".join(self._buf)
            self._buf = []
            text = _WS.sub(" ", text).strip()
            if text:
                self.paragraphs.append(text)

    def _mode(self, tag: str, attrs: list[tuple[str, str | None]]) -> int:
        if tag in SKIP_TAGS:
            return SKIP_MODE
        classes: list[str] = []
        for name, value in attrs:
            if not value:
                continue
            if name == "class":
                classes.extend(value.split())
            elif name == "id":
                classes.append(value)
            elif name == "role" and value in SKIP_ROLES:
                return SKIP_MODE
            elif name == "style" and "display:none" in value.replace(" ", ""):
                return SKIP_MODE
        if tag in CODE_TAGS:
            return CODE_MODE
        for c in classes:
            if c in SILENT_TOKENS:
                return SKIP_MODE
            if c in SKIP_TOKENS or c.startswith(("highlight-", "sig-", "sphx-glr-download", "language-")):
                return SKIP_MODE if tag in BLOCK_TAGS or tag in SKIP_TAGS else GAP_MODE
            if tag == "table" and c in TABLE_SKIP_CLASSES:
                return SKIP_MODE
        if tag == "span" and any(c in CODE_CLASSES for c in classes):
            return CODE_MODE
        return 0

    # -- parser callbacks -------------------------------------------------
    def handle_starttag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        if tag in BLOCK_TAGS and not self._skip:
            self._flush()
        if tag in VOID_TAGS:
            return
        if self._skip:
            self._stack.append((tag, 1))
            self._skip += 1
            return
        mode = self._mode(tag, attrs)
        self._stack.append((tag, mode))
        if mode:
            self._skip += 1
            if mode != SKIP_MODE:
                self._buf.append(CODE)
            elif tag in BLOCK_TAGS or tag in SKIP_TAGS:
                self._flush()

    def handle_startendtag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        if tag in BLOCK_TAGS and not self._skip:
            self._flush()

    def handle_endtag(self, tag: str) -> None:
        if tag in VOID_TAGS:
            if tag in BLOCK_TAGS and not self._skip:
                self._flush()
            return
        # Pop to the matching open tag (HTML in the wild is not always well nested).
        for i in range(len(self._stack) - 1, -1, -1):
            if self._stack[i][0] == tag:
                self._skip -= sum(1 for _t, mode in self._stack[i:] if mode)
                del self._stack[i:]
                break
        else:
            return
        if tag in BLOCK_TAGS and not self._skip:
            self._flush()

    def handle_data(self, data: str) -> None:
        if not self._skip:
            self._buf.append(data)

    def close(self) -> None:
        super().close()
        self._flush()


def clean(text: str) -> str:
    """Normalise one paragraph: NFC, plain spaces, no pilcrows, CODE runs merged."""
    text = unicodedata.normalize("NFC", text)
    text = text.replace("\u00b6", " ").replace("\u00a0", " ").replace("\u200b", "")
    text = _CODE_RUN.sub(CODE + " ", text)
    return _WS.sub(" ", text).strip()


def paragraphs(html: str) -> list[str]:
    """All candidate paragraphs of one page, cleaned but not yet filtered."""
    parser = ProseParser()
    parser.feed(html)
    parser.close()
    return [p for p in (clean(t) for t in parser.paragraphs) if p]
