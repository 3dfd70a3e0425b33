#!/usr/bin/env bash
# Installs everything the test suite needs on a fresh machine, then runs all of it:
# lint, the browser page's unit tests (node), and pytest (engine, API, browser).
set -euo pipefail
cd "$(dirname "$0")/.."

python3 -m pip install --quiet --disable-pip-version-check -e '.[test,cluster]'

# The scale-out tests start a real PostgreSQL server from Debian's package (as an unprivileged
# user, in a temporary folder); they need its binaries, not a running service.
if ! ls /usr/lib/postgresql/*/bin/initdb >/dev/null 2>&1 && ! command -v initdb >/dev/null 2>&1; then
  if [ "$(id -u)" = "0" ]; then
    apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq postgresql >/dev/null
  else
    echo "PostgreSQL is missing: install Debian's postgresql package (sudo apt-get install postgresql)" >&2
  fi
fi

# Optional: CHOLMOD for the direct solver (without it the engine uses QDLDL, a regular dependency).
if [ "$(id -u)" = "0" ] && ! python3 -c "import sksparse" 2>/dev/null; then
  { apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq libsuitesparse-dev \
      >/dev/null && python3 -m pip install --quiet --disable-pip-version-check \
      'scikit-sparse>=0.4.12,<0.5'; } || echo "scikit-sparse not installed: QDLDL (the plain-install direct solver) is used" >&2
fi
# CHOLMOD's supernodal factorisation runs in the system BLAS: with Debian's reference BLAS it is
# 2-3x slower at 1e6 unknowns than with OpenBLAS (the serial build: no threads that spin beside
# the service workers); installing it makes it the libblas.so.3 alternative.
if [ "$(id -u)" = "0" ] && ! dpkg -s libopenblas0-serial >/dev/null 2>&1; then
  { apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq \
      libopenblas0-serial >/dev/null; } || echo "OpenBLAS not installed: CHOLMOD is slower" >&2
fi

if ! command -v chromium >/dev/null 2>&1; then
  if [ "$(id -u)" = "0" ]; then
    apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq chromium >/dev/null
  else
    echo "chromium is missing: install Debian's chromium package (sudo apt-get install chromium)" >&2
  fi
fi

# node runs the page's unit tests; LibreOffice Calc (headless) runs the spreadsheet test.
if ! command -v node >/dev/null 2>&1 && [ "$(id -u)" = "0" ]; then
  apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq nodejs >/dev/null
fi
if ! command -v soffice >/dev/null 2>&1 && [ "$(id -u)" = "0" ]; then
  apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq \
    --no-install-recommends libreoffice-calc >/dev/null
fi
if ! command -v node >/dev/null 2>&1; then
  echo "node is missing: the page's unit tests cannot run; install Debian's nodejs package" \
    "(sudo apt-get install nodejs)" >&2
  exit 1
fi

python3 -m ruff check service tests $( [ -d bench ] && echo bench )
node --test frontend/tests/
python3 -m pytest "$@"
