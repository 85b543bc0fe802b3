"""Extraction speed per document kind, in MB/s, on generated ~1 MB inputs.

CPU time (process_time), so other load on the machine does not skew it.
Run: python tests/benchmarks/bench_extract.py [--size-mb 1] [--repeat 5]
Also times two adversarial inputs per kind (100k backticks, unclosed
constructs) to show that no extractor goes quadratic, and, when Pygments is
installed, its Python lexer on the same input for comparison.
"""

from __future__ import annotations

import argparse
import random
import time

from calami.text.formats import KINDS, extract

_WORDS = (
    "the model reads every paragraph and checks each word against its neighbours so that a typo "
    "in running prose is found quickly while code identifiers like parse_config or HttpClient stay quiet "
    "emoji 🎉 and CJK 漢字 text appear too"
).split()


def _sentence(rng: random.Random, n: int = 12) -> str:
    return " ".join(rng.choice(_WORDS) for _ in range(n)).capitalize() + "."


def _para(rng: random.Random) -> str:
    return " ".join(_sentence(rng) for _ in range(3))


def generate(kind: str, size: int, seed: int = 7) -> str:
    rng = random.Random(seed)
    parts: list[str] = []
    total = 0
    i = 0
    while total < size:
        i += 1
        p = _para(rng)
        if kind == "markdown":
            block = (
                f"## Section {i}\n\n{p} See `code_{i}` and [the docs](https://example.org/{i} \"t\").\n\n"
                f"- item {_sentence(rng, 6)}\n  - nested **bold** _emph_ text\n\n"
                f"```python\nx = {i}  # not prose\n```\n\n| a | b |\n|---|---|\n| {_sentence(rng, 4)} | two |\n\n"
                f"> {_sentence(rng)}\n<!-- note -->\n\n"
            )
        elif kind == "rst":
            block = (
                f"Section {i}\n==========\n\n{p} Use ``code`` and :func:`f` and `link <http://x/{i}>`_.\n\n"
                f".. note:: {_sentence(rng, 6)}\n\n.. code-block:: python\n\n   x = {i}\n\n- {_sentence(rng, 6)}\n\n"
            )
        elif kind == "latex":
            block = (
                f"\\section{{Part {i}}}\\label{{s{i}}}\n{p} See \\cite{{k{i}}} and $x^{i}$ % comment\n"
                f"\\emph{{{_sentence(rng, 4)}}}\n\n\\begin{{equation}}\n a = b_{i}\n\\end{{equation}}\n\n"
            )
        elif kind == "html":
            block = f"<div class=\"c{i}\"><p>{p} <b>bold</b> &amp; more</p><script>var x = {i};</script></div>\n"
        elif kind == "commit":
            block = f"{_sentence(rng, 6)}\n\n{p}\n# comment {i}\n\n"
        elif kind == "plain":
            block = p + "\n\n"
        elif kind == "python":
            block = (
                f"def f{i}(x):\n    \"\"\"{_sentence(rng)}\n\n    :param x: {_sentence(rng, 5)}\n    \"\"\"\n"
                f"    # {_sentence(rng)}\n    y = x + {i}  # {_sentence(rng, 4)}\n    return \"s # {i}\"\n\n"
            )
        elif kind == "ruby":
            block = (
                f"# {_sentence(rng)}\ndef f{i}(x)\n  y = \"a # {i}\" + %q(b # {i}) # {_sentence(rng, 4)}\n"
                f"  x =~ /#{i}/\nend\n=begin\n{_sentence(rng)}\n=end\n"
            )
        elif kind == "css":
            block = f"/* {_sentence(rng)} */\n.c{i} {{ background: url(http://x/{i}.png); content: \"/* {i} */\"; }}\n"
        elif kind == "org":
            block = (
                f"* TODO Section {i} :tag:\n{p} See ~code_{i}~ and [[https://example.org/{i}][the docs]].\n\n"
                f"- [ ] {_sentence(rng, 6)}\n#+BEGIN_SRC python\nx = {i}\n#+END_SRC\n| {_sentence(rng, 4)} | two |\n\n"
            )
        elif kind == "asciidoc":
            block = (
                f"== Section {i}\n\n{p} See `code_{i}` and https://example.org/{i}[the docs].\n\n"
                f"* {_sentence(rng, 6)}\n\n[source,python]\n----\nx = {i}\n----\n\n|===\n| {_sentence(rng, 4)} | two\n|===\n\n"
            )
        elif kind == "notebook":
            import json

            cell = {"cell_type": "markdown", "metadata": {}, "source": [f"## Part {i}\n", "\n", f"{p} See `x`.\n"]}
            code = {"cell_type": "code", "metadata": {}, "outputs": [], "execution_count": None,
                    "source": [f"# {_sentence(rng)}\n", f"x = {i}"]}
            block = json.dumps(cell, ensure_ascii=False) + ",\n" + json.dumps(code) + ",\n"
        elif kind in ("shell", "yaml", "toml"):
            body = {"shell": f'echo "a # {i}" $x\n', "yaml": f'key{i}: "v # {i}"\n', "toml": f'k{i} = "v # {i}"\n'}[kind]
            block = f"# {_sentence(rng)}\n{body}# {_sentence(rng)}\n"
        else:  # C-family
            block = (
                f"/**\n * {_sentence(rng)}\n * @param x {_sentence(rng, 4)}\n */\n"
                f"int f{i}(int x) {{ // {_sentence(rng, 6)}\n  return \"// {i}\" + x; /* {_sentence(rng, 4)} */\n}}\n"
            )
        parts.append(block)
        total += len(block)
    if kind == "notebook":
        return '{"cells": [\n' + "".join(parts).rstrip(",\n") + '\n], "metadata": {}, "nbformat": 4, "nbformat_minor": 5}\n'
    return "".join(parts)


def adversarial(kind: str) -> dict[str, str]:
    return {
        "backticks": "`" * 100_000 + " x " + "``a" * 30_000,
        "unclosed": {
            "markdown": "[a](" * 30_000 + "<a " * 30_000 + "<!--" + "$x " * 30_000,
            "rst": "``x " * 30_000 + ":r:`x " * 30_000,
            "latex": "\\label{" * 30_000 + "$" + "\\begin{verbatim}" * 10_000,
            "html": "<a \"" * 30_000 + "<script>" * 10_000,
            "ruby": "%q(" * 30_000 + "<<~EOS\n" * 10_000,
            "org": "[[" * 30_000 + "~" * 30_000 + "#+BEGIN_SRC\n" * 10_000,
            "asciidoc": "<<" * 30_000 + "link:" * 30_000 + "----\n" * 10_000,
            "notebook": '{"cells": [{"cell_type": "markdown", "source": "' + "\\u00e9" * 30_000 + "\\",

        }.get(kind, "/* \" ' ` r#\" \"\"\" '''" * 20_000),
    }


def _time(kind: str, text: str, repeat: int) -> float:
    best = float("inf")
    for _ in range(repeat):
        t0 = time.process_time()
        extract(text, kind)
        best = min(best, time.process_time() - t0)
    return best


def _read_corpus(pattern: str, size: int) -> str:
    import glob

    parts: list[str] = []
    total = 0
    for path in sorted(glob.glob(pattern, recursive=True)):
        try:
            with open(path, encoding="utf-8") as f:
                chunk = f.read()
        except (OSError, UnicodeDecodeError):
            continue
        parts.append(chunk)
        total += len(chunk)
        if total >= size:
            break
    return "".join(parts)[:size]


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__)
    ap.add_argument("--size-mb", type=float, default=1.0)
    ap.add_argument("--repeat", type=int, default=5)
    ap.add_argument(
        "--corpus", action="append", default=[], metavar="KIND=GLOB",
        help="also time real files: the first --size-mb of the files matching GLOB, read as KIND",
    )
    args = ap.parse_args()
    size = int(args.size_mb * 1_000_000)
    print(f"{'kind':<11} {'chars':>9} {'best ms':>9} {'MB/s':>7}   adversarial ms (backticks, unclosed)")
    for kind in KINDS:
        text = generate(kind, size)
        best = _time(kind, text, args.repeat)
        adv = [_time(kind, t, 1) * 1000 for t in adversarial(kind).values()]
        mbs = len(text.encode("utf-8")) / 1e6 / best
        print(f"{kind:<11} {len(text):>9} {best * 1000:>9.1f} {mbs:>7.1f}   {adv[0]:.0f}, {adv[1]:.0f}")
    for spec in args.corpus:
        kind, _, pattern = spec.partition("=")
        text = _read_corpus(pattern, size)
        if not text:
            print(f"{spec}: no readable files")
            continue
        best = _time(kind, text, args.repeat)
        mbs = len(text.encode("utf-8")) / 1e6 / best
        print(f"real {kind:<6} {len(text):>9} {best * 1000:>9.1f} {mbs:>7.1f}   ({pattern})")
    try:
        from pygments.lexers import PythonLexer
    except ImportError:
        return
    text = generate("python", size)
    t0 = time.process_time()
    for _ in PythonLexer().get_tokens(text):
        pass
    dt = time.process_time() - t0
    print(f"for comparison, Pygments PythonLexer on the python input: {dt * 1000:.0f} ms "
          f"({len(text.encode('utf-8')) / 1e6 / dt:.1f} MB/s)")


if __name__ == "__main__":
    main()
