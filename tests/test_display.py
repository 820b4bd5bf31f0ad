"""One display: every format shows numbers one way (freeladder.base.display).

References: numpy exact diagonalization of dense matrices built in tests/helpers.py (the shown
numbers are the model's); the definitions of the strings (w = exp(i pi / N), so a Pauli string
with phase w^2 is minus its letters; common practice); Python's own float arithmetic for the
rounding noise (0.6 * 3 == 1.7999999999999998 in binary64, IEEE 754).
"""

from __future__ import annotations

import re
from fractions import Fraction

import numpy as np
import sympy
from helpers import dense_string

import freeladder as fl
from freeladder.algebra.printing import format_terms, format_terms_latex
from freeladder.base import display

# a Z3 chain with complex couplings: complex quasi-energies and levels (Baxter 1989; Fendley 2014)
CLOCK = "Z0 Z1^2 + w X0 + 1.2*w X1 + 3/4 Z1 Z2^2 + X2 + 0.7*w^2 Z2 Z3^2 + X3"

_J = re.compile(r"\d(\.\d+)?(e-?\d+)?j\b")  # Python's imaginary unit after a number
_I = re.compile(r"(\d|\b)i\b")  # ours: 2i, 0.5i, i


def _units(text: str) -> set[str]:
    """The imaginary-unit conventions a rendering uses: {"i"}, {"j"}, both or none."""
    text = re.sub(r"<[^>]+>", " ", text)  # HTML tags
    return ({"j"} if _J.search(text) else set()) | ({"i"} if _I.search(text) else set())


def test_one_imaginary_unit_per_format_for_a_complex_spectrum_and_polynomial() -> None:
    m = fl.parse_model(CLOCK, states=3)
    sp = fl.free_spectrum(m)
    poly = fl.exclusion_polynomial(m)
    assert np.iscomplexobj(sp.quasi_energies) and np.any(np.imag(sp.quasi_energies) != 0)
    wc = fl.worked_calculation(m)
    text = "\n".join([str(sp), repr(sp), repr(poly), str(sp.levels(5)), str(fl.verify(m))])
    html = sp._repr_html_() + fl.exact_spectrum(m)._repr_html_()
    latex = "\n".join([poly._repr_latex_(), m._repr_latex_(), wc.to_latex()])
    markdown = "\n".join(c.source for c in wc if c.kind == "markdown")
    for name, rendering in (("text", text), ("HTML", html), ("LaTeX", latex), ("md", markdown)):
        assert _units(rendering) == {"i"}, (name, _J.findall(rendering)[:3])
    # what is shown is the model's spectrum: the ground energy against numpy's eigenvalues
    h = sum(complex(c) * dense_string(g, m.sites) for c, g in m.terms)
    eig = np.linalg.eigvals(h)
    lowest = eig[np.argmin(eig.real)]
    shown = re.search(r"ground energy: (\S+)", str(sp)).group(1)
    value = complex(shown.replace("i", "j"))
    assert abs(value.real - lowest.real) < 1e-9 and abs(abs(value.imag) - abs(lowest.imag)) < 1e-9


def test_an_n2_phase_prints_as_a_signed_real() -> None:
    # w = exp(i pi / 2) = i for N = 2, so w^2 X0 = -X0: check against the dense matrices.
    g = fl.make_string(2, [(0, 1, 0)], phase=2)
    x = fl.make_string(2, [(0, 1, 0)])
    np.testing.assert_allclose(dense_string(g, [0]), -dense_string(x, [0]))
    assert format_terms_latex([(0.28, g)]) == "-0.28 X_{0}"
    assert format_terms([(0.28, g)], display=True) == "-0.28 X0"
    # the text syntax keeps reading back exactly
    assert fl.parse_model(format_terms([(0.28, g)])).terms[0].coupling == -0.28
    # and w X0 (w = i) shows as i, a quarter turn as e^{i pi/4} for N = 4
    assert format_terms_latex([(Fraction(3, 4), fl.make_string(2, [(0, 1, 0)], phase=1))]) == (
        r"\frac{3}{4}i X_{0}"
    )
    g4 = fl.make_string(4, [(0, 1, 0)], phase=1)
    assert format_terms_latex([(1, g4)]) == r"e^{\pi i/4} X_{0}"


def test_float_noise_is_not_shown() -> None:
    assert 0.6 * 3 == 1.7999999999999998  # IEEE 754 binary64
    m = fl.parse_model("0.6*3 X0 X1 + X1 Z1 + 0.28 X0 Z0")
    first = str(list(fl.charge_series(m))[1])
    assert "1.8 X0 X1" in first and "1.7999999999999998" not in first
    assert "1.8 X_{0} X_{1}" in m._repr_latex_()
    assert display.number_text(0.6 * 3) == "1.8"
    # the model text keeps every digit: it must read back as the same float
    assert "1.7999999999999998" in str(m)
    assert fl.parse_model(str(m)).couplings == m.couplings


def test_exact_values_stay_exact() -> None:
    w3 = sympy.exp(2 * sympy.pi * sympy.I / 3)
    assert display.number_text(Fraction(-3, 4)) == "-3/4"
    assert display.number_latex(Fraction(-3, 4)) == r"-\frac{3}{4}"
    assert display.number_text(w3) == "exp(2 pi i/3)"
    assert display.number_latex(sympy.Rational(1, 2) * w3) == r"\frac{1}{2} e^{2\pi i/3}"
    assert display.number_text(sympy.I * sympy.Rational(3, 4)) == "(3/4)i"
    assert display.number_text(sympy.exp(sympy.pi * sympy.I)) == "-1"
    big = 3**200
    assert display.number_text(big).startswith("~2.65614") and len(display.number_text(big)) < 20


def test_tiny_parts_follow_one_rule() -> None:
    # below the shown precision (10^-12 of the modulus): not shown; above it: shown
    assert display.number_text(complex(1.5, 1e-17)) == "1.5"
    assert display.number_text(complex(1e-17, -2)) == "-2i"
    assert display.number_text(complex(1, 1e-6)) == "1+1e-6i"
    assert display.number_latex(complex(1, -1e-6)) == r"1 - (1 \times 10^{-6})i"
    assert display.number_html(-2.5e-7) == "\u22122.5\u00d710<sup>\u22127</sup>"
