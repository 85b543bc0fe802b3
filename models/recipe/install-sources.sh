#!/bin/sh
# Install the Debian documentation packages the English corpus is built from
# (see models/recipe/sources.py and README.md). Idempotent: apt-get install
# does nothing for packages already present. Run as root.
# scowl (word lists for unigram breadth) and sqlite3-doc (held-out evaluation
# prose, never trained on) are installed here too.
set -eu

PACKAGES="
apache2-doc
clang-15-doc
cmake-doc
crystal-doc
derby-doc
docutils-doc
dpdk-doc
erlang-doc
fop-doc
golang-1.19-doc
golang-1.19-src
golang-golang-x-crypto-dev
golang-golang-x-net-dev
golang-golang-x-tools-dev
golang-google-api-dev
golang-google-cloud-dev
golang-google-genproto-dev
golang-google-grpc-dev
golang-google-protobuf-dev
imagemagick-6-doc
libboost1.74-doc
libpython3.11-stdlib
librust-bytes-dev
librust-chrono-dev
librust-clap-dev
librust-futures-dev
librust-hyper-dev
librust-itertools-dev
librust-log-dev
librust-nom-dev
librust-rand-dev
librust-rayon-dev
librust-regex-dev
librust-serde-dev
librust-syn-dev
librust-tokio-dev
llvm-15-doc
mypy-doc
postgresql-doc-15
python-astropy-doc
python-attr-doc
python-babel-doc
python-click-doc
python-cryptography-doc
python-dask-doc
python-django-doc
python-flask-doc
python-h5py-doc
python-ipython-doc
python-jinja2-doc
python-lxml-doc
python-mpmath-doc
python-openstackclient-doc
python-pandas-doc
python-pint-doc
python-pygments-doc
python-pymongo-doc
python-pytest-doc
python-requests-doc
python-scipy-doc
python-scrapy-doc
python-setuptools-doc
python-skimage-doc
python-sklearn-doc
python-sqlalchemy-doc
python-statsmodels-doc
python-sympy-doc
python-tables-doc
python-tornado-doc
python-werkzeug-doc
python-xarray-doc
python3-botocore
python3-matplotlib
python3-nltk
python3-numpy
python3.11-doc
rust-doc
scowl
sphinx-doc
sqlite3-doc
twisted-doc
wordnet-base
"

# apt-cache knows nothing until the package lists have been fetched once.
missing=""
for p in $PACKAGES; do
    dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing="$missing $p"
done
if [ -z "$missing" ]; then
    echo "all corpus packages already installed"
    exit 0
fi
echo "installing:$missing"
if ! apt-cache show $missing >/dev/null 2>&1; then
    apt-get update
fi
# shellcheck disable=SC2086
DEBIAN_FRONTEND=noninteractive apt-get install -y --no-install-recommends $missing
