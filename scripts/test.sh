#!/usr/bin/env bash
# Installs everything the test suite needs on a fresh machine, then runs all of it:
# lint, the browser page's unit tests (node), and pytest (engine, API, browser).
set -euo pipefail
cd "$(dirname "$0")/.."

python3 -m pip install --quiet --disable-pip-version-check -e '.[test]'

if ! command -v chromium >/dev/null 2>&1; then
  if [ "$(id -u)" = "0" ]; then
    apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq chromium >/dev/null
  else
    echo "chromium is missing: install Debian's chromium package (sudo apt-get install chromium)" >&2
  fi
fi

python3 -m ruff check service tests $( [ -d bench ] && echo bench )
if command -v node >/dev/null 2>&1; then
  node --test frontend/tests/
fi
python3 -m pytest "$@"
