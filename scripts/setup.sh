#!/usr/bin/env bash
# Installs whatever is missing for Perpend and builds it; a second run skips what is there.
#   scripts/setup.sh            npm packages, .venv (JupyterLab, ipykernel, numpy, scipy), build
#   scripts/setup.sh --browser  the same plus Debian's chromium for the browser tests
set -euo pipefail
root="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
cd "$root"
say() { printf '[perpend setup] %s\n' "$*"; }

need_browser=0
[ "${1:-}" = "--browser" ] && need_browser=1

# 1. Node and npm packages from the lockfile.
command -v node >/dev/null || { say "Node.js 20 is required (not found on PATH)"; exit 1; }
if [ ! -f node_modules/.package-lock.json ] || [ package-lock.json -nt node_modules/.package-lock.json ]; then
  say "installing npm packages from the lockfile (npm ci)"
  npm ci --no-audit --no-fund
else
  say "npm packages: present"
fi

# 2. The project-local Python environment. --retries 0: where only a local wheel store is
# reachable, pip would otherwise spend minutes retrying the public index.
if ! .venv/bin/python -c 'import jupyterlab, ipykernel, numpy, scipy' >/dev/null 2>&1; then
  say "creating .venv with JupyterLab, ipykernel, numpy and scipy"
  python3 -m venv .venv
  .venv/bin/pip install --retries 0 -q -r requirements-dev.txt
else
  say "Python environment .venv: present"
fi

# 3. Debian's chromium, for the browser tests only.
if [ "$need_browser" = 1 ] && [ ! -x /usr/bin/chromium ]; then
  if [ "$(id -u)" = 0 ]; then
    say "installing Debian's chromium (apt-get)"
    apt-get update -q
    DEBIAN_FRONTEND=noninteractive apt-get install -y -q chromium
  else
    say "the browser tests need Debian's chromium; run:  sudo apt-get update && sudo apt-get install -y chromium"
    exit 1
  fi
fi

# 4. Build (TypeScript, then the prebuilt extension into .venv), skipped when nothing changed.
stamp_file=perpend/labextension/.perpend-build-stamp
stamp="$( (cat package-lock.json tsconfig*.json schema/*.json; find src style -type f -print0 | sort -z | xargs -0 cat) | sha256sum | cut -d' ' -f1)"
mode="${PERPEND_BUILD_MODE:-development}"
target=.venv/share/jupyter/labextensions/perpend
if [ -f "$stamp_file" ] && [ "$(cat "$stamp_file")" = "$stamp-$mode" ] && [ -d "$target" ]; then
  say "build: up to date"
else
  say "building Perpend ($mode); log in lib/build.log"
  mkdir -p lib
  flag=--development
  [ "$mode" = production ] && flag=
  if ! { npx tsc -b tsconfig.json && npx tsc -p src/core/tsconfig.json &&
         node scripts/build-labextension.mjs $flag; } > lib/build.log 2>&1; then
    tail -n 60 lib/build.log
    say "the build failed (full log: lib/build.log)"
    exit 1
  fi
  tail -n 1 lib/build.log
  echo "$stamp-$mode" > "$stamp_file"
fi

# 5. The server extension (perpend/server.py: kernel websockets without Nagle's delay), as the
# wheel installs it: the package into .venv's site-packages, its switch into .venv's config.
site="$(.venv/bin/python -c 'import sysconfig; print(sysconfig.get_paths()["purelib"])')"
mkdir -p "$site/perpend" .venv/etc/jupyter/jupyter_server_config.d
cp perpend/__init__.py perpend/server.py "$site/perpend/"
cp jupyter-config/server-config/perpend.json .venv/etc/jupyter/jupyter_server_config.d/perpend.json
