"""LaTeX extraction: exact spans for commands, math, environments, comments."""

from __future__ import annotations

import pytest

from calami.text.formats import extract

DOC = r"""\documentclass{article}
\usepackage[utf8]{inputenc}
\definecolor{mygreen}{rgb}{0,0.6,0}
\title{A Study of \emph{Things}}
\begin{document}
\maketitle
\section{Introduction}\label{sec:intro}
We show in \cite[p.~3]{knuth} that $x^2 + y$ holds, see Section~\ref{sec:intro}.
Costs are 5\% higher % a comment here
and \textbf{bold text} with \href{http://example.com}{link text} and \url{http://x.y}.

\begin{equation}
  E = mc^2
\end{equation}
\begin{verbatim}
raw text
\end{verbatim}
\begin{itemize}
  \item First item \footnote{A note.}
  \item[Label] Second
\end{itemize}
Inline \verb|code| and \(a+b\) and \[c\] done.
\begin{tabular}{ll}
Cell one & cell two \\
\end{tabular}
\begin{figure}[htbp]
\includegraphics[width=\linewidth]{plot.pdf}
\caption{Measured speed}
\end{figure}
\end{document}
"""


def pieces(text: str) -> list[tuple[str, str, bool]]:
    spans = extract(text, "latex")
    for a, b in zip(spans, spans[1:]):
        assert a.end <= b.start
    return [(text[s.start : s.end], s.kind, s.breaks_before) for s in spans]


def test_document():
    assert pieces(DOC) == [
        ("A Study of", "heading", True),
        ("Things", "heading", False),
        ("Introduction", "heading", True),
        ("We show in", "text", True),
        ("that", "text", False),
        ("holds, see Section", "text", False),
        (".\nCosts are 5", "text", False),
        ("higher", "text", False),
        ("and", "text", False),
        ("bold text", "text", False),
        ("with", "text", False),
        ("link text", "text", False),
        ("and", "text", False),
        (".", "text", False),
        ("First item", "text", True),
        ("A note.", "footnote", True),
        ("[Label] Second", "text", True),
        ("Inline", "text", True),
        ("and", "text", False),
        ("and", "text", True),
        ("done.", "text", True),
        ("Cell one", "text", True),
        ("cell two", "text", False),
        ("Measured speed", "caption", True),
    ]


def test_without_preamble_everything_is_body():
    assert [p for p, _, _ in pieces("Plain \\emph{text} here.\n\nNew para.\n")] == ["Plain", "text", "here.", "New para."]
    assert [b for _, _, b in pieces("One.\n\nTwo.\n")] == [True, True]


def test_math_environments_and_escaped_dollars():
    doc = "Price \\$5 is $a$ and $$b$$.\n\\begin{align*}\nx &= y\n\\end{align*}\nEnd \\% here.\n"
    assert [p for p, _, _ in pieces(doc)] == ["Price", "5 is", "and", ".", "End", "here."]


def test_comments_do_not_hide_text_after_escaped_percent():
    doc = "Ten \\% more % hidden words\nvisible words\n"
    assert [p for p, _, _ in pieces(doc)] == ["Ten", "more", "visible words"]


def test_crlf_tabs_emoji_cjk_offsets():
    doc = "\\section{漢字 🎉}\r\n\tText with wrold \\cite{x} end.\r\n"
    spans = extract(doc, "latex")
    got = [doc[s.start : s.end] for s in spans]
    assert got == ["漢字 🎉", "Text with wrold", "end."]
    assert spans[1].start + 10 == doc.index("wrold")


def test_unclosed_constructs():
    assert [p for p, _, _ in pieces("Text \\emph{unclosed and more\n")] == ["Text", "unclosed and more"]
    assert [p for p, _, _ in pieces("Before $unclosed math\n")] == ["Before"]
    assert [p for p, _, _ in pieces("Before \\begin{verbatim}\nnever closed\n")] == ["Before"]


@pytest.mark.parametrize(
    "source",
    ["\\label{" * 30_000, "$" + "x" * 50_000, "\\begin{verbatim}" * 10_000, "{" * 50_000, "}" * 50_000,
     "\\" * 50_000, "%" * 50_000, "\x00\udcff\ufffd"],
)
def test_adversarial_inputs_do_not_raise(source: str):
    for s in extract(source, "latex"):
        assert 0 <= s.start < s.end <= len(source)
