#!/usr/bin/env bash
# Start JupyterLab on the tour notebook, with the package installed in the repository's .venv.
# Usage: bash tools/lab.sh [extra jupyter lab arguments...]
set -euo pipefail
source "$(dirname "${BASH_SOURCE[0]}")/venv.sh"
ensure_venv lab
cd "$ROOT"

# No news prompt over the tour, no update check: defaults for this environment only (a user's own
# settings still win), written where JupyterLab reads overrides.
overrides="$VENV/share/jupyter/lab/settings/overrides.json"
if [ ! -f "$overrides" ]; then
    mkdir -p "$(dirname "$overrides")"
    cat >"$overrides" <<'JSON'
{"@jupyterlab/apputils-extension:notification": {"fetchNews": "false", "checkForUpdates": false}}
JSON
fi

args=(--LabApp.news_url= --ServerApp.root_dir="$ROOT" --LabApp.default_url=/lab/tree/example_notebooks/tour.ipynb)
if [ "$(id -u)" -eq 0 ]; then
    args+=(--allow-root)
fi
exec "$VENV/bin/jupyter" lab "${args[@]}" "$@"
