"""The ``freeladder`` command: the verdict, the free spectrum and the checks from a shell.

Usage::

    freeladder report MODEL_TEXT_OR_FILE [--states N] [--json] [--no-checks]
    freeladder export MODEL_TEXT_OR_FILE --to notebook|script|latex PATH [--states N] [--force]

``MODEL_TEXT_OR_FILE`` is model text in freeladder's syntax (quote it in the shell) or the path
of a file holding such text.  ``python -m freeladder`` runs the same command.

Exit status: 0 when everything ran and no check failed (a model that no theorem covers is a
valid answer, not an error); 1 when a check failed; 2 for bad input (malformed model text, a
missing file, bad options), with the message on standard error and no traceback.
"""

from __future__ import annotations

import argparse
import json
import sys
from collections.abc import Sequence
from pathlib import Path
from typing import Any, TextIO

from ..algebra.model import Model
from ..algebra.syntax import parse_model
from ..analysis import analyze
from ..base.errors import NoTheoremError
from ..base.jsonready import json_ready

__all__ = ["main", "report_data"]

_SHOWN_ENERGIES = 12


class _UsageError(Exception):
    """Bad input; the message is printed without a traceback."""


def _read_model(source: str, states: int) -> Model:
    path = Path(source)
    text = source
    try:
        is_file = path.is_file()
    except OSError:  # a long model text is not a valid path on some systems
        is_file = False
    if is_file:
        try:
            text = path.read_text(encoding="utf-8")
        except (OSError, UnicodeDecodeError) as err:
            raise _UsageError(f"cannot read the model file {source}: {err}") from None
    try:
        return parse_model(text, states=states)
    except ValueError as err:
        where = f"in {source}" if is_file else "in the model text"
        raise _UsageError(f"{where}: {err}") from None


def report_data(m: Model, checks: bool = True) -> dict[str, Any]:
    """The report of one model as JSON-ready data (what ``freeladder report --json`` prints).

    Keys: ``model``, ``verdict`` (kind, reasons, witness), ``quasi_energies`` and
    ``error_bounds`` (None when no theorem guarantees the spectrum; ``refusal`` then says why),
    ``ground_energy``, ``gap``, ``checks`` (one entry per check: name, method, status, value,
    tolerance).  Complex numbers are ``[re, im]`` pairs.
    """
    a = analyze(m)
    verdict = a.verdict
    out: dict[str, Any] = {
        "model": str(m),
        "states": m.states,
        "terms": len(m),
        "sites": len(m.sites),
        "verdict": {
            "kind": verdict.kind,
            "reasons": list(verdict.reasons),
            "witness": list(verdict.witness),
        },
        "quasi_energies": None,
        "error_bounds": None,
        "ground_energy": None,
        "gap": None,
        "refusal": None,
        "checks": [],
    }
    if m.is_symbolic:
        out["refusal"] = "symbolic couplings: substitute numbers to get a spectrum"
    else:
        try:
            sp = a.spectrum()
        except (NoTheoremError, ArithmeticError) as err:  # no theorem, or no convergence
            out["refusal"] = str(err)
        else:
            out["quasi_energies"] = sp.quasi_energies
            out["error_bounds"] = sp.error_bounds
            out["ground_energy"] = sp.ground_energy
            out["gap"] = _gap(sp)
    if checks:
        report = a.report()
        out["ok"] = bool(report.ok)
        out["problems"] = list(report.problems)
        out["checks"] = [_check_data(c) for c in report.checks]
    return json_ready(out)  # type: ignore[no-any-return]


def _gap(sp: Any) -> Any:
    try:
        return sp.gap
    except ValueError:  # complex spectra have no ordered gap
        return None


def _check_data(check: Any) -> dict[str, Any]:
    return {
        "name": check.name,
        "method": check.method,
        "status": check.status,
        "value": check.value,
        "passed": check.passed,
        "tolerance": check.tolerance,
        "detail": check.detail,
    }


def _number(v: Any) -> str:
    if v is None:
        return "-"
    if isinstance(v, list):
        re, im = v
        return f"{re:.12g}{im:+.12g}i"
    return f"{v:.12g}"


def _print_report(data: dict[str, Any], out: TextIO) -> None:
    w = out.write
    w(f"model ({data['terms']} terms, N = {data['states']}, {data['sites']} sites): ")
    text = data["model"]
    w((text if len(text) <= 200 else text[:197] + "...") + "\n\n")
    v = data["verdict"]
    w(f"verdict: {v['kind']}\n")
    for reason in v["reasons"]:
        w(f"  - {reason}\n")
    if v["witness"]:
        w(f"  witness terms: {v['witness']}\n")
    w("\n")
    if data["quasi_energies"] is None:
        w(f"no free spectrum: {data['refusal']}\n")
    else:
        eta, bounds = data["quasi_energies"], data["error_bounds"]
        w(f"quasi-energies ({len(eta)}, smallest first; bound on each):\n")
        for e, b in list(zip(eta, bounds, strict=True))[:_SHOWN_ENERGIES]:
            w(f"  {_number(e):>28}  +- {'-' if b is None else format(b, '.2g')}\n")
        if len(eta) > _SHOWN_ENERGIES:
            w(f"  ... {len(eta) - _SHOWN_ENERGIES} more (use --json for all)\n")
        w(f"ground energy: {_number(data['ground_energy'])}\n")
        w(f"gap: {_number(data['gap'])}\n")
    if data["checks"]:
        w("\nchecks:\n")
        width = max(len(c["name"]) for c in data["checks"])
        for c in data["checks"]:
            w(f"  {c['status']:<8} {c['name']:<{width}}  {c['method']}\n")
        w(f"verified: {'yes' if data['ok'] else 'NO'}\n")
        for problem in data.get("problems", []):
            w(f"  - {problem}\n")


def _export(m: Model, kind: str, path: str, force: bool) -> str:
    try:
        from .worked import worked_calculation
    except ImportError:  # pragma: no cover - the export module ships with the package
        raise _UsageError("this installation has no export module") from None
    calc = worked_calculation(m)
    target = Path(path)
    if target.is_symlink() and not target.exists():
        raise _UsageError(
            f"{path} is a symbolic link to a file that does not exist; nothing was written "
            "(remove the link or choose another path)"
        )
    if target.exists() and not force:
        raise _UsageError(f"{path} exists; pass --force to overwrite it")
    if not target.parent.is_dir():
        raise _UsageError(f"cannot write {path}: the folder {target.parent} does not exist")
    try:
        if kind == "notebook":
            calc.to_notebook(target, overwrite=force)
        else:
            text = calc.to_script() if kind == "script" else calc.to_latex()
            # "x" never replaces a file that appeared meanwhile (nor follows a link)
            with open(target, "w" if force else "x", encoding="utf-8") as handle:
                handle.write(text)
    except OSError as err:
        raise _UsageError(f"cannot write {path}: {err.strerror or err}") from None
    what = {"notebook": "a notebook", "script": "a Python script", "latex": "a LaTeX document"}
    return f"wrote the worked calculation ({len(calc)} cells) as {what[kind]} to {path}"


def _parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="freeladder",
        description="Free-fermion and free-parafermion spectra of spin chains, with checks.",
    )
    sub = parser.add_subparsers(dest="command", required=True)
    rep = sub.add_parser("report", help="verdict, quasi-energies, ground energy, gap, checks")
    rep.add_argument("model", help="model text in freeladder's syntax, or a file holding it")
    rep.add_argument("--states", type=int, default=2, help="states per site N (default 2)")
    rep.add_argument("--json", action="store_true", help="print one JSON object")
    rep.add_argument("--no-checks", action="store_true", help="skip fl.verify")
    exp = sub.add_parser("export", help="write the worked, self-verifying calculation")
    exp.add_argument("model", help="model text in freeladder's syntax, or a file holding it")
    exp.add_argument("--to", required=True, choices=("notebook", "script", "latex"))
    exp.add_argument("path", help="the file to write (never overwritten without --force)")
    exp.add_argument("--states", type=int, default=2, help="states per site N (default 2)")
    exp.add_argument("--force", action="store_true", help="overwrite an existing file")
    return parser


def main(argv: Sequence[str] | None = None) -> int:
    """Run the command line; returns the exit status."""
    parser = _parser()
    try:
        args = parser.parse_args(argv)
    except SystemExit as exit_:  # argparse already printed its message
        return int(exit_.code or 0)
    try:
        m = _read_model(args.model, args.states)
        if args.command == "export":
            print(_export(m, args.to, args.path, args.force))
            return 0
        data = report_data(m, checks=not args.no_checks)
    except _UsageError as err:
        print(f"freeladder: {err}", file=sys.stderr)
        return 2
    except (ValueError, TypeError) as err:
        print(f"freeladder: {err}", file=sys.stderr)
        return 2
    if args.json:
        print(json.dumps(data, allow_nan=False))
    else:
        _print_report(data, sys.stdout)
    return 1 if data.get("ok") is False else 0
