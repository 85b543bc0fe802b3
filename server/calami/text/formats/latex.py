"""LaTeX: running text and the text arguments of commands.

One forward scan.  Skipped: command names, the arguments of commands that
take labels, keys, paths, URLs, lengths or code (\\label, \\ref, \\cite...,
\\usepackage, \\begin/\\end names, \\url, the URL of \\href, ...), inline and
display math, math and code environments (equation, align, verbatim,
lstlisting, minted, ...), comments, and the preamble except the text of
\\title/\\author/\\date.  Kept: paragraphs and the arguments of text
commands (\\section, \\emph, \\textbf, \\caption, \\footnote, \\item, ...).
Sectioning commands, captions, footnotes and items start a new sentence.
"""

from __future__ import annotations

import regex

from calami.text.formats.textscan import ExtractOptions, ForwardFinder, LineEnds, SpanList
from calami.text.spans import Span

_NEXT = regex.compile(r"\\|%|\$|\{|\}|(?:\r\n|\r|\n)[ \t]*(?:\r\n|\r|\n)|&|~")
_NAME = regex.compile(r"[A-Za-z@]+\*?|[^A-Za-z@]")
_OPT_ARG = regex.compile(r"[ \t]*(?:\r\n|\r|\n)?[ \t]*\[")
_REQ_ARG = regex.compile(r"[ \t]*(?:\r\n|\r|\n)?[ \t]*\{")
_ENV_NAME = regex.compile(r"[ \t]*\{(?P<name>[A-Za-z@*]{1,60})\}")
_BEGIN_DOC = regex.compile(r"\\begin[ \t]*\{document\}")

# Command name -> number of required arguments to skip (common LaTeX/biblatex/hyperref usage).
SKIP_ARGS: dict[str, int] = {
    **dict.fromkeys(
        """label ref eqref pageref autoref nameref cref Cref vref cpageref cite citep citet citeauthor citeyear
        citealt citealp parencite textcite autocite footcite fullcite nocite supercite smartcite Cite Citep Citet
        usepackage RequirePackage documentclass LoadClass input include includeonly includegraphics url nolinkurl
        bibliography bibliographystyle addbibresource graphicspath pagestyle thispagestyle pagenumbering
        lstinputlisting inputminted verbatiminput hspace vspace hspace* vspace* setlength addtolength
        settowidth setcounter addtocounter stepcounter refstepcounter value arabic roman Roman alph Alph
        color pagecolor hypersetup geometry definecolor newlength newcounter linespread fontsize selectfont
        fontfamily fontseries fontshape usetikzlibrary tikzset pgfplotsset lstset setminted usemintedstyle
        captionsetup hyphenation newtheorem theoremstyle DeclareMathOperator bibitem glsadd gls Gls glspl
        acrshort acrlong acrfull ac acp acs acl index printindex makeindex label* includesvg
        """.split(),
        1,
    ),
    "textcolor": 1,
    "colorbox": 1,
    "href": 1,
    "hyperref": 0,
    "newcommand": 2,
    "renewcommand": 2,
    "providecommand": 2,
    "newcommand*": 2,
    "renewcommand*": 2,
    "newenvironment": 3,
    "renewenvironment": 3,
    "def": 1,
    "setkeys": 2,
    "multicolumn": 2,
    "multirow": 2,
    "rule": 2,
    "raisebox": 1,
    "resizebox": 2,
    "scalebox": 1,
    "makebox": 0,
    "parbox": 1,
    "fcolorbox": 2,
    "newacronym": 2,
    "newglossaryentry": 2,
}
# Commands whose arguments are prose that starts a new sentence.
BREAKING = frozenset(
    """part chapter section subsection subsubsection paragraph subparagraph part* chapter* section*
    subsection* subsubsection* paragraph* subparagraph* caption caption* footnote footnotetext item title
    author date thanks maketitle tableofcontents par newline linebreak pagebreak newpage clearpage
    bigskip medskip smallskip noindent marginpar subcaption""".split()
)
_KIND = {
    **dict.fromkeys("part chapter section subsection subsubsection paragraph subparagraph title".split(), "heading"),
    "caption": "caption",
    "subcaption": "caption",
    "footnote": "footnote",
    "footnotetext": "footnote",
}
_PREAMBLE_TEXT = frozenset({"title", "author", "date", "thanks"})
# Environments whose body is not prose (math, code, pictures; common practice).
SKIP_ENVIRONMENTS = frozenset(
    """equation equation* align align* alignat alignat* flalign flalign* gather gather* multline multline*
    eqnarray eqnarray* displaymath math split dmath dmath* verbatim verbatim* Verbatim Verbatim* BVerbatim
    lstlisting minted comment filecontents filecontents* tikzpicture pgfpicture picture asy
    sageblock sagesilent pycode luacode alltt""".split()
)
# Environments with a required argument that is not prose (column specs, widths).
_ENV_ARGS = {"tabular": 1, "tabular*": 2, "tabularx": 2, "longtable": 1, "array": 1, "minipage": 1,
             "wrapfigure": 2, "multicols": 1, "minted": 1, "thebibliography": 1, "tabulary": 2}
_VERB = frozenset({"verb", "verb*", "lstinline", "mintinline", "Verb", "path"})


def extract(text: str, options: ExtractOptions | None = None) -> list[Span]:
    return _Scanner(text).run()


class _Scanner:
    def __init__(self, text: str) -> None:
        self.text = text
        self.out = SpanList(text)
        self.finders: dict[str, ForwardFinder] = {}
        self.braces = _match_braces(text)
        self.line_end = LineEnds(text)
        # Group stack: (prose?, span kind) to restore when the group closes.
        self.groups: list[tuple[bool, str]] = []
        self.kind = "text"
        # '{' offsets of arguments of sectioning commands: their '}' ends a sentence.
        self.pending_kind: dict[int, str] = {}
        self.break_after: set[int] = set()

    def run(self) -> list[Span]:
        text = self.text
        n = len(text)
        bd = _BEGIN_DOC.search(text)
        # Before \begin{document}: only title/author/date arguments are prose.
        self.prose = bd is None
        self.preamble_end = bd.end() if bd else 0
        pos = piece = 0
        while pos < n:
            m = _NEXT.search(text, pos)
            if m is None:
                break
            p = m.start()
            if self.prose:
                self.out.add(piece, p, self.kind)
            c = text[p]
            if c == "\\":
                pos = self._command(p)
            elif c == "%":
                e = self.line_end.at(p)
                pos = e
            elif c == "$":
                pos = self._dollar_math(p)
            elif c == "{":
                self.groups.append((self.prose, self.kind))
                self.kind = self.pending_kind.pop(p, self.kind)
                pos = p + 1
            elif c == "}":
                if self.groups:
                    self.prose, self.kind = self.groups.pop()
                if p in self.break_after:
                    self.out.brk()
                pos = p + 1
            elif c in "&~":
                pos = p + 1
            else:  # blank line: a new paragraph
                self.out.brk()
                pos = m.end()
            if pos <= p:
                pos = p + 1
            if self.preamble_end and pos >= self.preamble_end:
                self.prose = True
                self.preamble_end = 0
                self.groups.clear()
            piece = pos
        if self.prose:
            self.out.add(piece, n, self.kind)
        return self.out.spans

    def _command(self, p: int) -> int:
        text = self.text
        nm = _NAME.match(text, p + 1, p + 200)
        if nm is None:
            return p + 1
        name = nm.group()
        pos = nm.end()
        if not name[0].isalpha() and name[0] != "@":
            if name == "(":
                return self._until(pos, r"\)")
            if name == "[":
                return self._until(pos, r"\]")
            if name in "\\":
                self.out.brk()
            return pos  # \%, \&, \_, \\, \, and friends
        if name in _VERB:
            return self._verbatim(name, pos)
        if name == "begin" or name == "end":
            em = _ENV_NAME.match(text, pos, pos + 200)
            if em is None:
                return pos
            env = em.group("name")
            self.out.brk()
            if name == "begin" and env in SKIP_ENVIRONMENTS:
                return self._until(em.end(), r"\end{" + env + "}")
            pos = em.end()
            if name == "begin":
                pos = self._skip_optional(pos)
                for _ in range(_ENV_ARGS.get(env, 0)):
                    pos = self._skip_group(pos)
            return pos
        if name in BREAKING:
            self.out.brk()
            if name in _PREAMBLE_TEXT and not self.prose:
                end = self._skip_optional(pos)
                rm = _REQ_ARG.match(text, end, end + 200)
                if rm:
                    close = self.braces.get(rm.end() - 1, -1)
                    if close > 0:
                        self._prose_range(rm.end(), close)
                        return close + 1
            after_opt = self._skip_optional(pos)
            rm = _REQ_ARG.match(text, after_opt, after_opt + 200)
            if rm:
                close = self.braces.get(rm.end() - 1, -1)
                if close > 0:
                    self.break_after.add(close)
                    self.pending_kind[rm.end() - 1] = _KIND.get(name.rstrip("*"), "text")
            return pos
        count = SKIP_ARGS.get(name)
        if count is not None:
            pos = self._skip_optional(pos)
            for _ in range(count):
                pos = self._skip_group(pos)
            return pos
        # Unknown or text command: its braces are processed as groups (prose if we are in prose).
        return pos

    def _prose_range(self, start: int, end: int) -> None:
        """Text of a title/author argument in the preamble; commands in it are dropped."""
        text = self.text
        pos = piece = start
        while pos < end:
            m = _NEXT.search(text, pos, end)
            if m is None:
                break
            p = m.start()
            self.out.add(piece, p, "heading")
            if text[p] == "\\":
                nm = _NAME.match(text, p + 1, end)
                pos = nm.end() if nm else p + 1
            else:
                pos = m.end()
            piece = pos
        self.out.add(piece, end, "heading")
        self.out.brk()

    def _skip_optional(self, pos: int) -> int:
        om = _OPT_ARG.match(self.text, pos, pos + 200)
        if om is None:
            return pos
        close = self.text.find("]", om.end(), om.end() + 2000)
        return close + 1 if close >= 0 else pos

    def _skip_group(self, pos: int) -> int:
        rm = _REQ_ARG.match(self.text, pos, pos + 200)
        if rm is None:
            # a single-token argument such as \input file or \label x
            return pos
        close = self.braces.get(rm.end() - 1, -1)
        return close + 1 if close >= 0 else self.line_end.at(pos)

    def _until(self, pos: int, closer: str) -> int:
        finder = self.finders.get(closer)
        if finder is None:
            finder = self.finders[closer] = ForwardFinder(self.text, closer)
        hit = finder.find(pos)
        self.out.brk()
        return hit[1] if hit else len(self.text)

    def _dollar_math(self, p: int) -> int:
        text = self.text
        if text.startswith("$$", p):
            return self._until(p + 2, "$$")
        finder = self.finders.get("$")
        if finder is None:
            finder = self.finders["$"] = ForwardFinder(text, regex.compile(r"(?<!\\)\$"))
        hit = finder.find(p + 1)
        return hit[1] if hit else len(text)

    def _verbatim(self, name: str, pos: int) -> int:
        text = self.text
        if name == "mintinline":
            pos = self._skip_group(pos)
        if pos >= len(text):
            return pos
        delim = text[pos]
        if delim == "{":
            close = self.braces.get(pos, -1)
            return close + 1 if close >= 0 else self.line_end.at(pos)
        close = text.find(delim, pos + 1, self.line_end.at(pos + 1))
        return close + 1 if close >= 0 else self.line_end.at(pos)




_BRACES = regex.compile(r"\\[\s\S]|%[^\r\n]*|[{}]")


def _match_braces(text: str) -> dict[int, int]:
    """Offset of each '{' -> offset of its matching '}' (escapes and comments ignored)."""
    pairs: dict[int, int] = {}
    stack: list[int] = []
    for m in _BRACES.finditer(text):
        c = m.group()
        if c == "{":
            stack.append(m.start())
        elif c == "}":
            if stack:
                pairs[stack.pop()] = m.start()
    return pairs
