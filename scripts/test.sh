#!/usr/bin/env bash
# Installs whatever is missing (npm packages, .venv, Debian's chromium), builds Perpend, and runs
# every test suite. The last line is "N passed, N failed" over all suites.
set -euo pipefail
root="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
cd "$root"
bash scripts/setup.sh --browser
exec node scripts/test-all.mjs "$@"
