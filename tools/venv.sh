# Sourced by tools/lab.sh and tools/test.sh: make sure the repository's .venv exists and holds
# the package (editable) with the extras named in FREELADDER_EXTRAS.
#
# The install is skipped when pyproject.toml has not changed since the last one (a stamp file
# in .venv records its hash), so a second run starts at once.  FREELADDER_VENV overrides the
# location of the virtual environment.
#
# The install builds the JupyterLab extension (nbext/, needs node) into nbext/labextension and
# copies it into the environment; link_labextension then replaces that copy with a link to
# nbext/labextension, so that a rebuild (`jlpm --cwd nbext build:prod`) is seen by the next
# JupyterLab start without reinstalling.

ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
VENV="${FREELADDER_VENV:-$ROOT/.venv}"

ensure_venv() {
    local extras="$1"
    if [ ! -x "$VENV/bin/python" ]; then
        echo "tools: creating $VENV"
        python3 -m venv "$VENV"
    fi
    local stamp="$VENV/.freeladder-$extras.stamp"
    local want
    want="$(sha256sum "$ROOT/pyproject.toml" | cut -d' ' -f1)"
    if [ ! -f "$stamp" ] || [ "$(cat "$stamp")" != "$want" ]; then
        echo "tools: installing freeladder[$extras] (editable) into $VENV"
        local log="$VENV/pip-install.log"
        if ! "$VENV/bin/python" -m pip install -e "$ROOT[$extras]" >"$log" 2>&1; then
            cat "$log"
            echo "tools: pip install failed (log above, also in $log)" >&2
            return 1
        fi
        echo "$want" >"$stamp"
    fi
    link_labextension
}

link_labextension() {
    local built="$ROOT/nbext/labextension"
    local share="$VENV/share/jupyter/labextensions/freeladder-cells"
    if [ -f "$built/package.json" ] && [ "$(readlink "$share" 2>/dev/null)" != "$built" ]; then
        rm -rf "$share"
        mkdir -p "$(dirname "$share")"
        ln -s "$built" "$share"
    fi
}
