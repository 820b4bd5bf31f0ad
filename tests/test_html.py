"""The HTML tables results show in a notebook: labels beside values, numbers right-aligned.

The tables are read back with the standard library's ``html.parser`` (an independent reader),
and the numbers they show are compared with numpy's exact diagonalization (common practice).
"""

from __future__ import annotations

from html.parser import HTMLParser

import numpy as np
import pytest

import freeladder as fl
from freeladder.base.htmltable import field_table, grid_table, is_number_text


class _Tables(HTMLParser):
    """Every table as a list of rows; each cell as (tag, text, style)."""

    def __init__(self) -> None:
        super().__init__()
        self.tables: list[list[list[tuple[str, str, str]]]] = []
        self.table_styles: list[str] = []
        self._cell: list[str] | None = None

    def handle_starttag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        style = dict(attrs).get("style") or ""
        if tag == "table":
            self.tables.append([])
            self.table_styles.append(style)
        elif tag == "tr":
            self.tables[-1].append([])
        elif tag in ("td", "th"):
            self._cell = [tag, "", style]

    def handle_data(self, data: str) -> None:
        if self._cell is not None:
            self._cell[1] += data

    def handle_endtag(self, tag: str) -> None:
        if tag in ("td", "th") and self._cell is not None:
            self.tables[-1][-1].append((self._cell[0], self._cell[1], self._cell[2]))
            self._cell = None


def _parse(text: str) -> _Tables:
    parser = _Tables()
    parser.feed(text)
    parser.close()
    return parser


def _align(style: str) -> str:
    return dict(
        (k.strip(), v.strip()) for k, v in (p.split(":", 1) for p in style.split(";") if ":" in p)
    ).get("text-align", "")


def test_field_table_puts_values_beside_labels() -> None:
    got = _parse(field_table([("gap", "1.5"), ("method", "dense <exact> & sure")]))
    assert len(got.tables) == 1
    (rows,) = got.tables
    assert [[c[:2] for c in r] for r in rows] == [
        [("th", "gap"), ("td", "1.5")],
        [("th", "method"), ("td", "dense <exact> & sure")],  # escaped, read back whole
    ]
    assert _align(rows[0][1][2]) == "right" and _align(rows[1][1][2]) == "left"
    assert _align(rows[0][0][2]) == "left"
    # natural width: the front end's full-width default is overridden
    assert "width:auto" in got.table_styles[0]


def test_grid_table_aligns_numeric_columns() -> None:
    got = _parse(grid_table(("k", "name"), [("1", "a"), ("22", "b")], numeric=(0,)))
    head, *body = got.tables[0]
    assert [c[1] for c in head] == ["k", "name"]
    assert [[_align(c[2]) for c in r] for r in body] == [["right", "left"]] * 2


@pytest.mark.parametrize(
    ("text", "number"),
    [("-2.46194", True), ("64", True), ("1.9e-16", True), ("0.5-1.2j", True), ("\u00b1 3e-9", True)]
    + [("unknown (no theorem)", False), ("sum eta^N: 1e-16", False), ("nan", False), ("", False)],
)
def test_number_text(text: str, number: bool) -> None:
    assert is_number_text(text) is number


def test_free_spectrum_table_shows_the_exact_ground_energy() -> None:
    # The tour's reach-2 chain with couplings 1, 0.4, ... (P. Fendley, J. Phys. A 52, 335002
    # (2019): free for every coupling); reference: numpy's dense eigenvalues.
    m = fl.exclusion_chain(6, reach=2, couplings=fl.staggered(6, 1.0, 0.4))
    sp = fl.free_spectrum(m)
    got = _parse(sp._repr_html_())
    eta_table, numbers, notes = got.tables
    head, *eta_rows = eta_table
    assert [c[1] for c in head] == ["k", "eta_k", "bound"]
    assert len(eta_rows) == len(sp.quasi_energies)
    assert all(_align(c[2]) == "right" for r in eta_rows for c in r)
    np.testing.assert_allclose([float(r[1][1]) for r in eta_rows], sp.quasi_energies, rtol=1e-9)

    fields = {r[0][1]: r[1] for r in numbers}
    assert {"ground energy", "gap", "degeneracy"} <= set(fields)
    assert all(_align(cell[2]) == "right" for cell in fields.values())
    exact = np.linalg.eigvalsh(m.to_sparse().toarray())
    assert float(fields["ground energy"][1]) == pytest.approx(exact[0], abs=1e-5)
    # text rows (method, guarantee) sit in their own table, left-aligned beside their labels
    assert {r[0][1] for r in notes} >= {"method", "guarantee"}
    assert all(_align(r[1][2]) == "left" for r in notes)


def test_exact_spectrum_table_right_aligns_levels() -> None:
    m = fl.ising_chain(4, field=0.7)
    ed = fl.exact_spectrum(m)
    (table,) = _parse(ed._repr_html_()).tables
    head, *rows = table
    assert [c[1] for c in head] == ["level", "multiplicity"]
    exact = np.linalg.eigvalsh(m.to_sparse().toarray())
    assert float(rows[0][0][1]) == pytest.approx(exact[0], abs=1e-9)
    assert sum(int(r[1][1]) for r in rows) == len(exact)
    assert all(_align(c[2]) == "right" for r in rows for c in r)


def test_long_charge_formula_breaks_into_lines() -> None:
    # MathJax 3 (JupyterLab's) does not break long display formulas (common practice: break
    # them by hand in an aligned block); the broken form must hold the same products.
    m = fl.exclusion_chain(6, reach=2, couplings=fl.staggered(6, 1.0, 0.4))
    order = list(fl.charge_series(m))[2]
    shown = order._repr_latex_().strip("$")
    assert shown.startswith(r"\begin{aligned}") and shown.count(r"\\") >= 1
    flat = shown.removeprefix(r"\begin{aligned} ").removesuffix(r" \end{aligned}")
    flat = flat.replace(r" \\ & ", " ").replace("= {} & ", "= ")
    assert flat == order.latex()
    # the couplings are shown as typed: 0.4 * 0.4 = 0.16 without float noise
    assert "0.16 X_{1}" in shown and "0.16000000000000003" not in shown
