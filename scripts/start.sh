#!/usr/bin/env bash
# Installs whatever is missing, then starts JupyterLab on 127.0.0.1 with Perpend installed and the
# demo notebook open. Prints the URL with its token. Ctrl-C stops the server.
#   PORT=8888 scripts/start.sh     (default port 8888; PERPEND_TOKEN to choose the token)
set -euo pipefail
root="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
cd "$root"
bash scripts/setup.sh

# Keep Jupyter's configuration, runtime files and settings inside the work tree.
local_dir="$root/.jupyter-local"
mkdir -p "$local_dir"
export JUPYTER_CONFIG_DIR="$local_dir/config" JUPYTER_DATA_DIR="$local_dir/data"
export JUPYTER_RUNTIME_DIR="$local_dir/runtime" IPYTHONDIR="$local_dir/ipython"
export JUPYTERLAB_SETTINGS_DIR="$local_dir/settings" JUPYTERLAB_WORKSPACES_DIR="$local_dir/workspaces"

# A quiet first start: no news prompt (the user can turn it on in the Settings Editor).
news="$JUPYTERLAB_SETTINGS_DIR/@jupyterlab/apputils-extension/notification.jupyterlab-settings"
if [ ! -f "$news" ]; then
  mkdir -p "$(dirname "$news")"
  echo '{ "fetchNews": "false" }' > "$news"
fi

port="${PORT:-8888}"
token="${PERPEND_TOKEN:-$(.venv/bin/python -c 'import secrets; print(secrets.token_hex(24))')}"
url="http://127.0.0.1:${port}/lab/tree/perpend-demo.ipynb?token=${token}"
.venv/bin/jupyter labextension list 2>&1 | grep -i perpend || true
cat <<MSG

Perpend is starting in JupyterLab. Open this URL (the demo notebook opens with it):

    $url

MSG
extra=()
[ "$(id -u)" = 0 ] && extra+=(--allow-root)  # Jupyter refuses to run as root without it
exec .venv/bin/jupyter lab "${extra[@]}" --no-browser --ip=127.0.0.1 --port="$port" --port-retries=0 \
  --IdentityProvider.token="$token" --ServerApp.root_dir="$root/demo"
