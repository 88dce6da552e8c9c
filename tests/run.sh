#!/usr/bin/env bash
# Set up everything the test suite needs on a fresh machine, then run it.
# Usage: bash tests/run.sh [pytest args...]
set -euo pipefail
cd "$(dirname "$0")/.."

PY=${PYTHON:-python3}
if [ ! -x .venv/bin/python ]; then
  "$PY" -m venv .venv
fi
.venv/bin/python -m pip install -q --disable-pip-version-check -e '.[test]'

# The onboard kernel is tested in the real MicroPython interpreter (WebAssembly port, run by Node.js).
if ! command -v node >/dev/null 2>&1 || ! command -v npm >/dev/null 2>&1; then
  echo "error: Node.js and npm are required for the MicroPython tests (install Node.js 18+); not skipping them" >&2
  exit 2
fi
npm ci --prefix tests/micropython --no-audit --no-fund --loglevel=error

# One worker per core (pytest-xdist); all tests of a file on one worker, so each module fixture is
# made once (tests/conftest.py also keeps files that share an expensive session fixture together).
# Arguments given here come after, so `-n 0` runs everything in this one process.
exec .venv/bin/python -m pytest -n auto --dist loadfile "$@"
