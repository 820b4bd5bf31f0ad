#!/usr/bin/env bash
# Run every check of the project: ruff (lint and format, on the files git tracks), mypy, then
# pytest over tests/.
# Usage: bash tools/test.sh [pytest arguments...]
set -euo pipefail
source "$(dirname "${BASH_SOURCE[0]}")/venv.sh"
ensure_venv test
cd "$ROOT"

# Lint exactly the files git tracks: a notebook or script a user saves in the checkout (an
# exported worked calculation in example_notebooks/, say) is theirs, not the project's.
# Outside a git checkout (an unpacked archive) everything is linted.
lint_targets=(.)
if git -C "$ROOT" rev-parse --is-inside-work-tree >/dev/null 2>&1; then
    lint_targets=()
    while IFS= read -r -d '' f; do
        [ -e "$f" ] && lint_targets+=("$f")
    done < <(git -C "$ROOT" ls-files -z --cached -- '*.py' '*.pyi' '*.ipynb')
fi

static=0
echo "== ruff check (${#lint_targets[@]} tracked files)"
"$VENV/bin/ruff" check "${lint_targets[@]}" || static=1
echo "== ruff format --check"; "$VENV/bin/ruff" format --check "${lint_targets[@]}" || static=1
echo "== mypy";              "$VENV/bin/mypy" || static=1
if [ "$static" -ne 0 ]; then
    echo "== static checks FAILED (see above); running pytest anyway"
fi

if [ ! -x /usr/bin/chromium ]; then
    echo "== NOTE: /usr/bin/chromium is missing, so the browser tests will be SKIPPED"
    echo "==       (Debian/Ubuntu: apt-get install chromium; under CI=true they fail instead)"
fi
echo "== pytest"
pytest_status=0
"$VENV/bin/python" -m pytest "$@" || pytest_status=$?
# pytest's summary line stays the last line printed.
if [ "$pytest_status" -ne 0 ]; then
    exit "$pytest_status"
fi
exit "$static"
