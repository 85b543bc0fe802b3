"""Which Debian documentation packages feed the training corpus, and which of their files.

Every package here is checked by hand against its /usr/share/doc/<pkg>/copyright:
the documentation falls under a permissive licence (the ``licence`` field).
Left out on purpose: sqlite3-doc (held out for evaluation, see
tests/data/heldout-prose/), git-doc, perl-doc and the Debian handbook (kept for
independent evaluation), python-celery-doc (its docs/ are CC-BY-SA-4.0),
nodejs-doc (conflicts with the nodejs package installed on the build machine).
"""

from __future__ import annotations

import os
import re
from dataclasses import dataclass
from typing import Iterator

DOC = "/usr/share/doc"

# Pages that are lists of links or generated indexes, and copies of sources.
COMMON_EXCLUDE = re.compile(
    r"(?:^|/)(?:genindex|py-modindex|np-modindex|modindex|search|searchindex|objects|sitemap)[^/]*\.html?$"
    r"|/_(?:modules|sources|static|images|downloads|sphinx_design_static)/"
    r"|/\.doctrees/"
)


SUFFIXES = {"html": (".html", ".htm", ".html.gz"), "go": (".go",), "rust": (".rs",), "py": (".py",), "go-generated": (".go",),
            "wordnet": (".noun", ".verb", ".adj", ".adv"), "json-doc": ("service-2.json", "service-2.json.gz")}


@dataclass(frozen=True)
class Source:
    """One training package: where its pages are and under which licence."""

    name: str  # corpus file name: build/corpus/<name>.txt
    package: str  # Debian package
    licence: str
    roots: tuple[str, ...]
    exclude: str = ""  # extra regex on the full path
    notes: str = ""
    kind: str = "html"  # "html" pages, "go" / "rust" / "py" source files (comment prose), "wordnet", "json-doc"

    def files(self) -> Iterator[str]:
        """Pages (or source files) of this source, in a stable order; symlinks are not followed."""
        suffixes = SUFFIXES[self.kind]
        extra = re.compile(self.exclude) if self.exclude else None
        found: list[str] = []
        for root in self.roots:
            if os.path.isfile(root):
                found.append(root)
                continue
            for folder, dirs, names in os.walk(root):
                dirs.sort()
                for name in names:
                    if not name.endswith(suffixes):
                        continue
                    path = os.path.join(folder, name)
                    if os.path.islink(path) or COMMON_EXCLUDE.search(path):
                        continue
                    if extra and extra.search(path):
                        continue
                    found.append(path)
        yield from sorted(set(found))


RUST = f"{DOC}/rust-doc/html"
BOTO = "/usr/lib/python3/dist-packages/botocore/data"
PY3 = "/usr/lib/python3/dist-packages"
GOCODE = "/usr/share/gocode/src"
PY_EXCLUDE = r"/(?:tests?|testing|_vendor|vendored|__pycache__)/|/test_[^/]*\.py$"


def latest_service_files(root: str) -> tuple[str, ...]:
    """The newest API version's service description of every botocore service (older ones repeat it)."""
    out = []
    if os.path.isdir(root):
        for service in sorted(os.listdir(root)):
            folder = os.path.join(root, service)
            versions = sorted(d for d in os.listdir(folder) if os.path.isdir(os.path.join(folder, d))) \
                if os.path.isdir(folder) else []
            for version in reversed(versions):
                found = [os.path.join(folder, version, n) for n in SUFFIXES["json-doc"]
                         if os.path.isfile(os.path.join(folder, version, n))]
                if found:
                    out.append(found[0])
                    break
    return tuple(out)

SOURCES: list[Source] = [
    Source("python3.11", "python3.11-doc", "PSF-2.0", (f"{DOC}/python3.11/html",)),
    Source("postgresql-15", "postgresql-doc-15", "PostgreSQL", (f"{DOC}/postgresql-doc-15/html",),
           exclude=r"/(?:bookindex|release-\d)"),
    Source("django", "python-django-doc", "BSD-3-Clause", (f"{DOC}/python-django-doc/html",)),
    Source("golang-1.19", "golang-1.19-doc", "BSD-3-Clause (Go)", (f"{DOC}/golang-1.19-doc/html",)),
    Source(
        "rust",
        "rust-doc",
        "MIT or Apache-2.0",
        tuple(f"{RUST}/{d}" for d in (
            "book", "reference", "nomicon", "edition-guide", "embedded-book", "rust-by-example",
            "rustc", "rustdoc", "unstable-book", "std", "proc_macro", "error-index.html",
        )),
        exclude=r"/std/arch/|/print\.html$|/toc\.html$|/all\.html$",
        notes="books and std prose; core/alloc (copies of std), src/ and implementors/ skipped",
    ),
    Source("scipy", "python-scipy-doc", "BSD-3-Clause", (f"{DOC}/python-scipy-doc/html",)),
    Source("pandas", "python-pandas-doc", "BSD-3-Clause", (f"{DOC}/python-pandas-doc/html",),
           exclude=r"/html/generated/"),  # generated/ holds redirect stubs
    Source("sklearn", "python-sklearn-doc", "BSD-3-Clause", (f"{DOC}/python-sklearn-doc/html",)),
    Source("sqlalchemy", "python-sqlalchemy-doc", "MIT", (f"{DOC}/python-sqlalchemy-doc/html",)),
    Source("cmake", "cmake-doc", "BSD-3-Clause", (f"{DOC}/cmake-doc/html",)),
    Source("sphinx", "sphinx-doc", "BSD-2-Clause", (f"{DOC}/sphinx-doc/html",)),
    Source("docutils", "docutils-doc", "public domain", (f"{DOC}/docutils-doc",)),
    Source("apache2", "apache2-doc", "Apache-2.0", (f"{DOC}/apache2-doc/manual/en",)),
    Source("llvm-15", "llvm-15-doc", "Apache-2.0 WITH LLVM-exception", (f"{DOC}/llvm-15-doc/html",)),
    Source("clang-15", "clang-15-doc", "Apache-2.0 WITH LLVM-exception", (f"{DOC}/clang-15/html",)),
    Source("erlang", "erlang-doc", "Apache-2.0", (f"{DOC}/erlang-doc",), exclude=r"/jinterface-[^/]*/doc/html/java/"),
    Source("flask", "python-flask-doc", "BSD-3-Clause", (f"{DOC}/python-flask-doc/html",)),
    Source("werkzeug", "python-werkzeug-doc", "BSD-3-Clause", (f"{DOC}/python-werkzeug-doc/html",)),
    Source("jinja2", "python-jinja2-doc", "BSD-3-Clause", (f"{DOC}/python-jinja2-doc/html",)),
    Source("click", "python-click-doc", "BSD-3-Clause", (f"{DOC}/python-click-doc/html",)),
    Source("pytest", "python-pytest-doc", "MIT", (f"{DOC}/python-pytest-doc/html",)),
    Source("ipython", "python-ipython-doc", "BSD-3-Clause", (f"{DOC}/python-ipython-doc/html",)),
    Source("astropy", "python-astropy-doc", "BSD-3-Clause", (f"{DOC}/python-astropy-doc/html",)),
    Source("statsmodels", "python-statsmodels-doc", "BSD-3-Clause", (f"{DOC}/python-statsmodels-doc/html",)),
    Source("dask", "python-dask-doc", "BSD-3-Clause", (f"{DOC}/python-dask-doc/html",)),
    Source("xarray", "python-xarray-doc", "Apache-2.0", (f"{DOC}/python-xarray-doc/html",)),
    Source("mypy", "mypy-doc", "MIT", (f"{DOC}/mypy/html",)),
    Source("setuptools", "python-setuptools-doc", "MIT", (f"{DOC}/python-setuptools-doc/html",)),
    Source("requests", "python-requests-doc", "Apache-2.0", (f"{DOC}/python-requests-doc/html",)),
    Source("attrs", "python-attr-doc", "MIT", (f"{DOC}/python-attr-doc/html",)),
    Source("scrapy", "python-scrapy-doc", "BSD-3-Clause", (f"{DOC}/python-scrapy-doc/html",)),
    Source("sympy", "python-sympy-doc", "BSD-3-Clause", (f"{DOC}/python-sympy-doc/html",)),
    Source("lxml", "python-lxml-doc", "BSD-3-Clause", (f"{DOC}/python-lxml-doc/html",)),
    Source("cryptography", "python-cryptography-doc", "Apache-2.0 or BSD-3-Clause",
           (f"{DOC}/python-cryptography-doc/html",)),
    Source("pygments", "python-pygments-doc", "BSD-2-Clause", (f"{DOC}/python-pygments-doc/html",)),
    Source("h5py", "python-h5py-doc", "BSD-3-Clause", (f"{DOC}/python-h5py-doc/html",)),
    Source("mpmath", "python-mpmath-doc", "BSD-3-Clause", (f"{DOC}/python-mpmath-doc/html",)),
    Source("boost", "libboost1.74-doc", "BSL-1.0", (f"{DOC}/libboost1.74-doc/doc/html",)),
    Source("openstackclient", "python-openstackclient-doc", "Apache-2.0",
           (f"{DOC}/python-openstackclient-doc/html",)),
    Source("tornado", "python-tornado-doc", "Apache-2.0", (f"{DOC}/python-tornado-doc",)),
    Source("pymongo", "python-pymongo-doc", "Apache-2.0", (f"{DOC}/python-pymongo-doc/html",)),
    Source("pint", "python-pint-doc", "BSD-3-Clause", (f"{DOC}/python-pint-doc/html",)),
    Source("babel", "python-babel-doc", "BSD-3-Clause", (f"{DOC}/python-babel-doc/html",)),
    Source(
        "golang-1.19-src",
        "golang-1.19-src",
        "BSD-3-Clause (Go)",
        ("/usr/share/go-1.19/src",),
        exclude=r"_test\.go$|/testdata/|/vendor/",
        notes="comment prose of the Go standard library and tools",
        kind="go",
    ),
    Source(
        "python3.11-src",
        "libpython3.11-stdlib",
        "PSF-2.0",
        ("/usr/lib/python3.11",),
        exclude=r"/(?:test|tests|idle_test|site-packages|dist-packages|__pycache__|config-3[^/]*)/",
        notes="docstrings and comments of the standard library (files of libpython3.11-minimal too)",
        kind="py",
    ),
    *(
        Source(f"go-{name}", package, licence, (root,), exclude=r"_test\.go$|/testdata/|/vendor/",
               notes="comment prose", kind="go")
        for name, package, licence, root in (
            ("x-tools", "golang-golang-x-tools-dev", "BSD-3-Clause", "/usr/share/gocode/src/golang.org/x/tools"),
            ("x-net", "golang-golang-x-net-dev", "BSD-3-Clause", "/usr/share/gocode/src/golang.org/x/net"),
            ("x-crypto", "golang-golang-x-crypto-dev", "BSD-3-Clause", "/usr/share/gocode/src/golang.org/x/crypto"),
            ("protobuf", "golang-google-protobuf-dev", "BSD-3-Clause",
             "/usr/share/gocode/src/google.golang.org/protobuf"),
            ("grpc", "golang-google-grpc-dev", "Apache-2.0", "/usr/share/gocode/src/google.golang.org/grpc"),
        )
    ),
    *(
        Source(f"rust-{crate}", f"librust-{crate}-dev", "MIT or Apache-2.0", (f"/usr/share/cargo/registry/{crate}-{version}",),
               exclude=r"/(?:tests|benches)/", notes="doc comments and comments", kind="rust")
        for crate, version in (
            ("tokio", "1.24.2"), ("serde", "1.0.152"), ("syn", "1.0.107"), ("regex", "1.7.1"), ("clap", "4.0.32"),
            ("rayon", "1.6.1"), ("hyper", "0.14.19"), ("futures", "0.3.21"), ("itertools", "0.10.3"),
            ("nom", "7.1.1"), ("rand", "0.8.5"), ("chrono", "0.4.23"), ("bytes", "1.2.1"), ("log", "0.4.17"),
        )
    ),
]

# Added for the trigram model (issue 10): everyday English (WordNet glosses and
# examples), more manuals, API descriptions and docstrings.  Licences checked
# in each package's /usr/share/doc/<pkg>/copyright ("Files: *" stanza).
SOURCES += [
    Source("wordnet", "wordnet-base", "WordNet-3.0 (permissive)",
           tuple(f"/usr/share/wordnet/data.{pos}" for pos in ("noun", "verb", "adj", "adv")),
           notes="glosses: definitions and example sentences", kind="wordnet"),
    Source("twisted", "twisted-doc", "MIT", (f"{DOC}/twisted-doc/html",)),
    Source("dpdk", "dpdk-doc", "BSD-3-Clause", (f"{DOC}/dpdk/guides",)),
    Source("skimage", "python-skimage-doc", "BSD-3-Clause", (f"{DOC}/python-skimage-doc/html",)),
    Source("tables", "python-tables-doc", "BSD-3-Clause", (f"{DOC}/python-tables-doc/html",)),
    Source("imagemagick", "imagemagick-6-doc", "ImageMagick (Apache-2.0 style)", (f"{DOC}/imagemagick-6-doc/html",)),
    Source("crystal", "crystal-doc", "Apache-2.0", (f"{DOC}/crystal/api-docs",)),
    Source("derby", "derby-doc", "Apache-2.0", (f"{DOC}/derby-doc",), notes="javadoc and overview pages"),
    Source("fop", "fop-doc", "Apache-2.0", (f"{DOC}/fop-doc/html",), notes="javadoc"),
    Source("botocore", "python3-botocore", "Apache-2.0", latest_service_files(BOTO),
           notes="documentation strings of the newest version of each service description", kind="json-doc"),
    *(
        Source(f"go-{name}", package, licence, (f"{GOCODE}/{root}",), exclude=r"_test\.go$|/testdata/|/vendor/",
               notes="comment prose" + (", generated files included (API clients)" if kind != "go" else ""), kind=kind)
        for name, package, licence, root, kind in (
            ("google-api", "golang-google-api-dev", "BSD-3-Clause", "google.golang.org/api", "go-generated"),
            ("genproto", "golang-google-genproto-dev", "Apache-2.0", "google.golang.org/genproto", "go-generated"),
            ("google-cloud", "golang-google-cloud-dev", "Apache-2.0", "cloud.google.com/go", "go"),
        )
    ),
    *(
        Source(f"py-{name}", package, licence, (f"{PY3}/{name}",), exclude=PY_EXCLUDE,
               notes="docstrings and comments", kind="py")
        for name, package, licence in (
            ("numpy", "python3-numpy", "BSD-3-Clause"),
            ("matplotlib", "python3-matplotlib", "PSF-style (matplotlib licence)"),
            ("nltk", "python3-nltk", "Apache-2.0"),
        )
    ),
]

PACKAGES: list[str] = sorted({s.package for s in SOURCES})
