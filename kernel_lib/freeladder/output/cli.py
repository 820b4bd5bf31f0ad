"""The ``freeladder`` command: the verdict, the free spectrum and the checks from a shell.

Usage::

    freeladder report MODEL_TEXT_OR_FILE [--states N] [--json] [--no-checks]
    freeladder export MODEL_TEXT_OR_FILE PATH [--states N] [--force]

``export`` writes a notebook, a script or a LaTeX section, chosen by the suffix of ``PATH``
(:data:`EXPORT_SUFFIXES`: ``.ipynb``, ``.py``, ``.tex``).

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
from ..analysis import Analysis, analyze
from ..base import display
from ..base.jsonready import json_ready

__all__ = ["EXPORT_SUFFIXES", "main", "report_data"]

_SHOWN_ENERGIES = 12

EXPORT_SUFFIXES = {".ipynb": "notebook", ".py": "script", ".tex": "LaTeX section"}
"""What ``freeladder export`` writes, by the suffix of the file it is given."""


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


def report_data(m: Model | Analysis, checks: bool = True) -> dict[str, Any]:
    """The report of one model as JSON-ready data (what ``freeladder report --json`` prints).

    The same data as :meth:`freeladder.Analysis.to_dict` (one schema): ``model``, ``states``,
    ``terms``, ``sites``, ``verdict``, ``charge_counts``, ``polynomial``, ``spectrum`` (the
    numbers, or the refusal with its reason, witness and what to do instead: see
    :meth:`freeladder.SpectrumAnswer.to_dict`) and ``report`` (the checks, with ``ok`` and
    ``problems``; None with ``checks=False``).  Complex numbers are ``[re, im]`` pairs.
    """
    return analyze(m).to_dict(checks=checks)


def _number(v: Any) -> str:
    if v is None:
        return "-"
    if isinstance(v, list):
        re, im = v
        return display.number_text(complex(re, im))
    return display.number_text(v)


def _print_report(data: dict[str, Any], out: TextIO) -> None:
    w = out.write
    w(f"model ({data['terms']} terms, N = {data['states']}, {data['sites']} sites): ")
    text = data["model"]
    w((text if len(text) <= 200 else text[:197] + "...") + "\n\n")
    v = data["verdict"]
    if "error" in v:
        w(f"verdict: not decided ({v['message']})\n")
        v = {"reasons": [], "witness": []}
    else:
        w(f"verdict: {v['kind']}\n")
    for reason in v["reasons"]:
        w(f"  - {reason}\n")
    if v["witness"]:
        w(f"  witness terms: {v['witness']}\n")
    w("\n")
    sp = data["spectrum"]
    if "error" in sp:
        w(f"no free spectrum: {sp['message']}\n")
    elif sp["quasi_energies"] is None:
        refusal = sp["refusal"]
        w(f"no free spectrum: {refusal['reason']}\n  instead: {refusal['instead']}\n")
    else:
        if sp["status"] == "unproven":
            w(f"NOT GUARANTEED: {sp['refusal']['reason']}\n")
        if sp["sector"] is not None:
            sector = sp["sector"]
            values = ", ".join(
                f"{g} = {v:+d}"
                for g, v in zip(sector["cycle_strings"], sector["cycle_values"], strict=True)
            )
            w(f"sector: {sector['selection']} ({values})\n")
        eta, bounds = sp["quasi_energies"], sp["error_bounds"]
        w(f"quasi-energies ({len(eta)}, smallest first; bound on each):\n")
        for e, b in list(zip(eta, bounds, strict=True))[:_SHOWN_ENERGIES]:
            w(f"  {_number(e):>28}  +- {'-' if b is None else display.bound_text(b)}\n")
        if len(eta) > _SHOWN_ENERGIES:
            w(f"  ... {len(eta) - _SHOWN_ENERGIES} more (use --json for all)\n")
        w(f"ground energy: {_number(sp['ground_energy'])}\n")
        w(f"gap: {_number(sp['gap'])}\n")
    report = data["report"]
    if report is not None and "error" in report:
        w(f"\nchecks: could not run ({report['message']})\n")
    elif report is not None and report["checks"]:
        w("\nchecks:\n")
        width = max(len(c["name"]) for c in report["checks"])
        for c in report["checks"]:
            w(f"  {c['status']:<8} {c['name']:<{width}}  {c['method']}\n")
        w(f"verified: {'yes' if report['ok'] else 'NO'}\n")
        for problem in report["problems"]:
            w(f"  - {problem}\n")


def _export(m: Model, path: str, force: bool) -> str:
    try:
        from .worked import worked_calculation
    except ImportError:  # pragma: no cover - the export module ships with the package
        raise _UsageError("this installation has no export module") from None
    target = Path(path)
    kind = EXPORT_SUFFIXES.get(target.suffix.lower())
    if kind is None:
        known = ", ".join(f"{suffix} ({what})" for suffix, what in EXPORT_SUFFIXES.items())
        raise _UsageError(
            f"cannot tell what to write from the name {path!r}: the file name must end in {known}"
        )
    calc = worked_calculation(analyze(m))
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
    what = {"notebook": "a notebook", "script": "a Python script"}.get(kind, f"a {kind}")
    return f"wrote the worked calculation ({len(calc)} cells) as {what} to {path}"


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
    exp.add_argument(
        "path",
        help="the file to write, by its suffix: .ipynb (notebook), .py (script), .tex (LaTeX "
        "section); never overwritten without --force",
    )
    exp.add_argument("--states", type=int, default=2, help="states per site N (default 2)")
    exp.add_argument("--force", action="store_true", help="overwrite an existing file")
    cen = sub.add_parser("census", help="classify every chain of a few short-range term types")
    cen.add_argument("--states", type=int, default=2, help="states per site N (default 2)")
    cen.add_argument("--support", type=int, default=2, help="sites a term type covers at most")
    cen.add_argument("--types", type=int, default=2, help="term types in one chain at most")
    cen.add_argument("--json", action="store_true", help="print the rows as one JSON list")
    cen.add_argument("--out", help="also write the table to this .csv or .parquet file")
    return parser


def _census(args: argparse.Namespace) -> int:
    from ..studies.census import census

    table = census(args.states, args.support, args.types, progress=False, path=args.out)
    if args.json:
        rows = json_ready(table.astype(object).where(table.notna(), None).to_dict("records"))
        print(json.dumps(rows, allow_nan=False))
    else:
        cols = ["types", "verdict", "spectrum", "name"]
        print(table[cols].to_string(index=False))
    return 0


def main(argv: Sequence[str] | None = None) -> int:
    """Run the command line; returns the exit status."""
    parser = _parser()
    try:
        args = parser.parse_args(argv)
    except SystemExit as exit_:  # argparse already printed its message
        return int(exit_.code or 0)
    if args.command == "census":
        try:
            return _census(args)
        except (ValueError, TypeError, ImportError) as err:
            print(f"freeladder: {err}", file=sys.stderr)
            return 2
    try:
        m = _read_model(args.model, args.states)
        if args.command == "export":
            print(_export(m, args.path, args.force))
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
    report = data["report"]
    return 1 if report is not None and report.get("ok") is not True else 0
