"""Verification checks: commuting charges, inversion relation, the whole report.

References: S. J. Elman, A. Chapman and S. T. Flammia, Commun. Math. Phys. 388, 969 (2021),
arXiv:2012.07857 -- for N = 2 the charges Q^(s) commute with H and with each other when the
frustration graph is claw-free, and T(u) T(-u) = P(u^2) when it is also even-hole-free;
F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B 102, 121101(R) (2020) -- clock exclusion chains.
The 2D transverse-field Ising patch has claws, so its charges must fail to commute (negative
control).  Small cases are cross-checked with dense numpy commutators.
"""

from __future__ import annotations

from fractions import Fraction

import numpy as np
import pytest

import freeladder as fl
from freeladder import StringSum
from freeladder.base.errors import CheckNotApplicable, NoTheoremError
from freeladder.checks import verification
from freeladder.checks.verification import (
    Check,
    Report,
    charge_pairs_check,
    hamiltonian_check,
    inversion_check,
)


def enumerated_charges(m: fl.Model) -> list[StringSum]:
    """Q^(s), s = 1..alpha, from an explicit enumeration of the independent sets (test-only)."""
    cm = m.strings.commutation_matrix()
    n = len(m)
    adj = [set(cm.indices[cm.indptr[j] : cm.indptr[j + 1]].tolist()) for j in range(n)]
    coeffs = list(m.couplings)
    sets = [(j,) for j in range(n)]
    strings, values = m.strings, coeffs
    out = []
    while sets:
        out.append(StringSum(strings, values))
        left, right, new_sets, new_values = [], [], [], []
        for i, subset in enumerate(sets):
            for j in range(subset[-1] + 1, n):
                if not adj[j].intersection(subset):
                    left.append(i)
                    right.append(j)
                    new_sets.append((*subset, j))
                    new_values.append(values[i] * coeffs[j])
        if not new_sets:
            break
        strings = strings.products(left, right, m.strings)
        sets, values = new_sets, new_values
    return out


def rational(n: int) -> list[Fraction]:
    return [Fraction(j + 2, j + 1) for j in range(n)]


@pytest.mark.parametrize(
    "model",
    [
        fl.exclusion_chain(9, reach=1, couplings=rational(9)),
        fl.exclusion_chain(10, reach=2, couplings=rational(10)),
        fl.exclusion_chain(7, reach=1, states=3, couplings=[1, 2, 3, 1, 2, 3, 1]),
        fl.exclusion_chain(8, reach=2, states=3, couplings=rational(8)),
        fl.exclusion_chain(9, reach=2, states=2, couplings=fl.random_couplings(9, seed=1)),
    ],
    ids=["p1-N2", "p2-N2", "p1-N3", "p2-N3", "p2-N2-float"],
)
def test_exclusion_chains_pass(model: fl.Model) -> None:
    charges = enumerated_charges(model)
    first = hamiltonian_check(StringSum.from_model(model), charges)
    second = charge_pairs_check(model, charges)
    assert first.passed and second.passed, second.detail
    exact = all(isinstance(c, (int, Fraction)) for c in model.couplings)
    assert (first.tolerance == 0.0) == exact
    assert second.tolerance == 0.0  # the sweep is exact even for float couplings
    inv = inversion_check(model, charges)
    assert inv.passed, inv.detail


def test_claw_free_non_chain_commutes() -> None:
    # Kitaev honeycomb patch: its frustration graph is a line graph (claw-free), not a chain,
    # and contains a hexagon (an even hole), so the inversion relation need not hold.
    m = fl.kitaev_honeycomb(2, 4, jx=1, jy=2, jz=Fraction(1, 3))
    assert fl.chain_structure(m) is None
    charges = enumerated_charges(m)
    first = hamiltonian_check(StringSum.from_model(m), charges)
    second = charge_pairs_check(m, charges)
    assert first.passed and second.passed
    inv = inversion_check(m, charges)
    assert inv.passed is False  # a cycle operator is left over: P(u^2) alone is not enough
    # the sweep names it: the product of the six bond terms around the hexagon, at order u^6
    assert "(6,)" in inv.detail and "independent" in inv.detail


def test_claw_model_fails() -> None:
    m = fl.ising_lattice(2, 3, field=1, bond=1)
    charges = enumerated_charges(m)
    h = StringSum.from_model(m)
    first, second = hamiltonian_check(h, charges), charge_pairs_check(m, charges)
    assert first.passed is False and second.passed is False
    assert "non-zero for s = [3" in first.detail
    # its 13 strings on 6 sites are dependent, so the sweep leaves it to the pairwise route
    assert "pair by pair" in second.detail and "dependent" in second.detail
    # dense cross-check of the failing order with numpy
    hd = m.to_sparse().toarray()
    q3 = charges[2].to_sparse().toarray()
    assert np.linalg.norm(hd @ q3 - q3 @ hd) > 1.0
    q2 = charges[1].to_sparse().toarray()
    assert np.allclose(hd @ q2, q2 @ hd) == h.commutator(charges[1]).is_zero()


def test_small_charges_match_dense_commutators() -> None:
    m = fl.exclusion_chain(6, reach=2, couplings=rational(6))
    charges = enumerated_charges(m)
    mats = [q.to_sparse().toarray() for q in charges]
    hd = m.to_sparse().toarray()
    for q, qd in zip(charges, mats, strict=True):
        assert np.allclose(hd @ qd, qd @ hd)
        assert StringSum.from_model(m).commutator(q).is_zero()
    # a non-charge does not commute: the check can fail
    bogus = charges[1] + StringSum.from_strings([(1, fl.pauli("Z", [0]))], m.sites, 2)
    first = hamiltonian_check(StringSum.from_model(m), [charges[0], bogus])
    assert first.passed is False


def test_report_display() -> None:
    ok = Check("a", "exact", 0.0, 0.0, True, "fine")
    bad = Check("b", "float", 1e-9, 0.5, False, "broken <here>")
    skipped = Check("c", "float", 1e-9, float("nan"), None, "too big")
    r = Report((ok, bad, skipped), "X0")
    assert not r.ok and r.failed == (bad,)
    assert "FAILED" in str(r) and "&lt;here&gt;" in r._repr_html_() and "<table>" in r._repr_html_()
    assert Report((ok, skipped), "X0").ok
    assert not Report((skipped,), "X0").ok
    assert r["b"] is bad


def test_verify_end_to_end() -> None:
    good = fl.verify(fl.exclusion_chain(7, reach=2, couplings=rational(7)))
    assert good.ok, str(good)
    names = {c.name for c in good.checks}
    assert "spectrum = exact diagonalization" in names and "[H, Q(s)] = 0" in names
    claw = fl.verify(fl.ising_lattice(2, 3, field=1, bond=1))
    assert not claw.ok
    assert claw["[H, Q(s)] = 0"].passed is False
    assert claw["spectrum = exact diagonalization"].passed is False


def test_verify_clock_chain_and_symbols() -> None:
    # Z_3 exclusion chain, reach 1, integer couplings: exact inversion relation with omega u
    r = fl.verify(fl.exclusion_chain(5, reach=1, states=3, couplings=[1, 2, 3, 2, 1]))
    assert r.ok, str(r)
    inv = r["T(u) T(wu) ... T(w^(N-1) u) = P(u^N)"]
    assert inv.passed and inv.tolerance == 0.0
    sym = fl.verify(fl.exclusion_chain(4, reach=2, couplings="symbols"))
    assert sym["[H, Q(s)] = 0"].passed and sym.notes
    assert all("spectrum" not in c.name for c in sym.checks)


def test_verify_30_term_chain_is_exact_and_fast() -> None:
    # 30-term reach-2 chain: 1.25 x 10^5 independent sets, 6 x 10^9 pairs of them.  Every
    # [H, Q(s)] in the string algebra, every [Q(r), Q(s)] and T(u) T(-u) = P(u^2) by the sweep,
    # all exact (Alcaraz-Pimenta 2020: these identities hold for every exclusion chain).
    r = fl.verify(fl.exclusion_chain(30, reach=2, couplings=[1 + j % 3 for j in range(30)]))
    names = ("[H, Q(s)] = 0", "[Q(r), Q(s)] = 0", "T(u) T(-u) = P(u^2)")
    for name in names:
        assert r[name].passed and r[name].tolerance == 0.0, str(r)
    assert "sweep" in r["[Q(r), Q(s)] = 0"].method
    assert sum(r[name].seconds for name in names) < 60


def test_pairs_of_symbolic_charges_go_pair_by_pair() -> None:
    m = fl.exclusion_chain(6, reach=1, couplings="symbols")
    check = charge_pairs_check(m, enumerated_charges(m))
    assert check.passed and "pair by pair" in check.detail and "symbolic" in check.detail


def test_large_chain_reads_h_off_the_sweep() -> None:
    # 60 terms: order 5 alone has C(52, 5) = 2598960 products, too many to list, so [H, Q(s)]
    # is read off the sweep of all pairs (H is Q(1)); Alcaraz-Pimenta 2020 says it holds.
    r = fl.verify(fl.exclusion_chain(60, reach=2))
    assert r["[H, Q(s)] = 0"].passed and "covers r = 1" in r["[H, Q(s)] = 0"].detail
    assert r["[Q(r), Q(s)] = 0"].passed and r["T(u) T(-u) = P(u^2)"].passed


def test_skipped_pairs_do_not_pass() -> None:
    # Symbolic couplings force the pairwise route; a tiny budget skips pairs: not a pass.
    m = fl.exclusion_chain(8, reach=1, couplings="symbols")
    # an incomplete check can fail but never pass: it is "not run" (CheckNotApplicable)
    with pytest.raises(CheckNotApplicable, match="skipped"):
        charge_pairs_check(m, enumerated_charges(m), max_pairs=10)


def test_a_crash_inside_a_check_is_a_failure_with_traceback(
    monkeypatch: pytest.MonkeyPatch,
) -> None:
    # inject a broadcasting bug into a helper of the sum-rule check: a failure, not "not run"
    def broken(*args: object) -> str:
        return str(np.ones(3) + np.ones(4))

    monkeypatch.setattr(verification, "_sum_rule_detail", broken)
    r = fl.verify(fl.exclusion_chain(7, reach=2, couplings=rational(7)))
    check = r[verification.SUM_RULES]
    assert check.passed is False and check.status == "FAILED"
    assert "ValueError" in check.detail and "broadcast" in check.traceback
    assert "Traceback" in check.traceback and "broken" in check.traceback
    assert not r.ok and "FAILED" in str(r) and "broadcast" in str(r)
    # every other check still ran and passed
    assert all(c.passed for c in r.checks if c is not check)


def test_only_check_not_applicable_means_not_run() -> None:
    def cannot(m: fl.Model) -> Check:
        raise CheckNotApplicable("needs N = 5")

    def crashes(m: fl.Model) -> Check:
        raise ZeroDivisionError("bug")

    m = fl.ising_chain(3)
    skipped = verification._run("my check", cannot, m)
    assert skipped.passed is None and "needs N = 5" in skipped.detail and not skipped.traceback
    crashed = verification._run("my check", crashes, m)
    assert crashed.passed is False and "ZeroDivisionError" in crashed.traceback
    assert skipped.name == crashed.name == "my check"


def test_requested_exact_diagonalization_that_cannot_run_is_not_ok() -> None:
    m = fl.exclusion_chain(22, reach=1)  # 23 sites: 2^23 states, above the sparse limit 2^22
    r = fl.verify(m, exact_diagonalization=True)
    ed = r[verification.EXACT]
    assert ed.name == "spectrum = exact diagonalization"  # a real name, never a docstring
    assert ed.passed is None and ed.required and "8388608" in ed.detail
    assert not r.ok and any("asked for" in p for p in r.problems)
    assert all(c.passed for c in r.checks if c.passed is not None)
    # the same model without the request: ok, the comparison is listed as not run
    auto = fl.verify(m)
    assert auto.ok and auto[verification.EXACT].passed is None


def test_nothing_decisive_is_not_ok() -> None:
    # the 3 x 5 Ising patch has claws (not free); only the sum rules (which test the roots
    # against the polynomial, not freeness) can run at this size
    r = fl.verify(fl.ising_lattice(3, 5))
    assert not r.ok
    assert any("decisive" in p for p in r.problems)
    assert all(not (c.passed and c.decisive) for c in r.checks)


def test_unproven_spectrum_is_reported_as_probe() -> None:
    # a claw (Elman-Chapman-Flammia 2021: no theorem): the spectral checks run as probes on the
    # unproven numbers and say so; numpy's eigenvalues disagree with them
    m = fl.parse_model("Z0 Z1 Z2 + X0 + 0.7 X1 + 1.3 X2 + 0.4 Z1")
    r = fl.verify(m)
    assert "no theorem" in r.verdict and "probe" in r.verdict
    ed = r[verification.EXACT]
    assert "(probe)" in ed.method and ed.passed is False
    exact = np.linalg.eigvalsh(m.to_sparse().toarray())
    free = fl.free_spectrum(m, **_unproven()).levels(None)
    deg = free.multiplicity or len(exact) // len(free)
    assert np.max(np.abs(np.sort(np.repeat(free.energies, deg)) - exact)) > 0.1
    assert not r.ok


def test_jordan_wigner_models_with_cycles_are_verified_by_sector() -> None:
    # a two-leg ladder with two plaquettes (Chapman-Flammia 2020): free sector by sector, so
    # the report tests the sector spectra against numpy and does not claim T(u)T(-u) = P(u^2)
    m = fl.parse_model("X0 X1 + Y1 Y2 + X3 X4 + Y4 Y5 + Z0 Z3 + Z1 Z4 + Z2 Z5")
    r = fl.verify(m)
    assert r.ok, r.problems
    assert "sector" in r.verdict
    assert r[verification.SECTORS].passed and r[verification.CONSERVED].passed
    inversion = r[verification._inversion_name(2)]
    assert inversion.passed is False and not inversion.claimed
    assert inversion.status == "does not hold" and inversion not in r.failed
    energies, mult = fl.jordan_wigner_spectrum(m).levels()
    exact = np.linalg.eigvalsh(m.to_sparse().toarray())
    assert np.max(np.abs(np.sort(np.repeat(energies, mult)) - exact)) < 1e-10


def _unproven() -> dict[str, bool]:
    """``unproven=True`` when free_spectrum knows the keyword (it refuses such models then)."""
    import inspect

    return (
        {"unproven": True} if "unproven" in inspect.signature(fl.free_spectrum).parameters else {}
    )


def test_report_to_dict_is_json_and_frozen() -> None:
    import dataclasses
    import json

    r = fl.verify(fl.exclusion_chain(14, reach=1), exact_diagonalization=True)
    data = r.to_dict()
    text = json.dumps(data, allow_nan=False)
    assert '"not run"' in text and '"passed"' in text
    # 32768 states: the requested comparison runs sparsely (the lowest distinct levels)
    assert data["ok"] is True and data["checks"][0]["name"] == "[H, Q(s)] = 0"
    assert any(c["name"] == verification.LOWEST and c["status"] == "passed" for c in data["checks"])
    assert {"name", "method", "tolerance", "value", "status", "seconds", "reference"} <= set(
        data["checks"][0]
    )
    with pytest.raises(dataclasses.FrozenInstanceError):
        r.checks[0].passed = False  # type: ignore[misc]
    with pytest.raises(dataclasses.FrozenInstanceError):
        r.complete = False  # type: ignore[misc]
    table = str(r).splitlines()
    header = next(line for line in table if "status" in line)
    for word in ("check", "method", "tolerance", "value", "time", "reference"):
        assert word in header


def test_keyboard_interrupt_returns_a_partial_report(monkeypatch: pytest.MonkeyPatch) -> None:
    def interrupted(*args: object) -> Check:
        raise KeyboardInterrupt

    monkeypatch.setattr(verification, "inversion_check", interrupted)
    r = fl.verify(fl.exclusion_chain(7, reach=2))
    assert not r.complete and not r.ok
    assert [c.name for c in r.checks] == ["[H, Q(s)] = 0", "[Q(r), Q(s)] = 0"]
    assert all(c.passed for c in r.checks) and "interrupted" in str(r)


def test_long_checks_drive_a_delayed_tqdm_bar(monkeypatch: pytest.MonkeyPatch) -> None:
    made: list[dict[str, object]] = []

    class FakeBar:
        def __init__(self, **kwargs: object) -> None:
            self.n = 0
            self.closed = False
            made.append({"kwargs": kwargs, "bar": self})

        def update(self, step: int) -> None:
            self.n += step

        def close(self) -> None:
            self.closed = True

    def slow(m: fl.Model, progress: verification._Progress) -> Check:
        for done in (1, 2, 5):
            progress(done, 5)
        return Check("slow", "exact", 0.0, 0.0, True, "fine")

    monkeypatch.setattr(verification, "_bar", FakeBar)  # tqdm.auto.tqdm, imported on use
    check = verification._shown("slow", slow, fl.ising_chain(2))
    assert check.passed
    assert len(made) == 1 and made[0]["kwargs"]["delay"] == 2.0  # shown only after 2 s
    bar = made[0]["bar"]
    assert bar.n == 5 and bar.closed  # type: ignore[attr-defined]
    # the sweeps of a real run report their progress through the same bar
    made.clear()
    fl.verify(fl.exclusion_chain(12, reach=2))
    assert any(m["kwargs"]["desc"] == "[Q(r), Q(s)] = 0" and m["bar"].n > 0 for m in made)  # type: ignore[attr-defined]


def test_verify_takes_its_parts_from_one_analysis(monkeypatch: pytest.MonkeyPatch) -> None:
    import freeladder.analysis as analysis_module
    import freeladder.spectra.edge as edge_module

    calls: list[str] = []
    real = analysis_module.free_spectrum

    def counted(*args: object, **kwargs: object) -> fl.FreeSpectrum:
        calls.append("free_spectrum")
        return real(*args, **kwargs)  # type: ignore[arg-type]

    monkeypatch.setattr(analysis_module, "free_spectrum", counted)
    monkeypatch.setattr(edge_module, "free_spectrum", counted)
    a = fl.analyze(fl.exclusion_chain(7, reach=2, couplings=rational(7)))
    r = fl.verify(a)
    assert r.ok and calls == ["free_spectrum"]  # once for sum rules, ladder and ED together
    assert "exact" in repr(a) and "spectrum" in repr(a)  # kept in the analysis for later
    # a second report from the same analysis computes no spectrum again
    assert a.report().ok and calls == ["free_spectrum"]


def test_unproven_spectrum_needs_exact_diagonalization_to_be_ok() -> None:
    identity = Check("[Q(r), Q(s)] = 0", "sweep", 0.0, 0.0, True, "every word vanishes")
    exact = Check(verification.EXACT, "exact diagonalization", 1e-9, 1e-12, True, "matched")
    assert Report((identity,), guaranteed=True).ok
    unproven = Report((identity,), guaranteed=False)
    assert not unproven.ok and any("no theorem" in p for p in unproven.problems)
    assert Report((identity, exact), guaranteed=False).ok


def test_dependent_strings_are_caught() -> None:
    # Z0 Z1, Z1 Z2, Z0 Z2 multiply to the identity, a relation the frustration graph does not
    # show: the single polynomial is refused (its free levels differ from numpy's eigenvalues)
    # and the report rests on the sector route, which accounts for the relation
    m = fl.parse_model("Z0 Z1 + X1 + Z1 Z2 + X2 + Z0 Z2")
    exact = np.linalg.eigvalsh(m.to_sparse().toarray())
    with pytest.raises(NoTheoremError):
        fl.free_spectrum(m)
    free = fl.free_spectrum(m, **_unproven()).ground_energy
    assert abs(free - exact[0]) > 0.1  # the numpy reference disagrees with the free levels
    r = fl.verify(m)
    assert r.ok and r[verification.SECTORS].passed
    # the odd ring of 13 commuting Z Z terms: true ground energy -11 (the product of all terms
    # is 1, so an even number of them is -1; brute force over the diagonal with numpy)
    ring = fl.parse_model(" + ".join(f"Z{i} Z{(i + 1) % 13}" for i in range(13)))
    with pytest.raises(NoTheoremError):
        fl.free_spectrum(ring)
    spins = 1 - 2 * ((np.arange(2**13)[:, None] >> np.arange(13)[None, :]) & 1)
    diagonal = (spins * np.roll(spins, -1, axis=1)).sum(axis=1)
    assert diagonal.min() == -11
    assert fl.jordan_wigner_spectrum(ring, sector="ground").ground_energy == pytest.approx(-11)
    assert fl.verify(ring)[verification.CONSERVED].passed


def test_route_by_cost_and_no_listing_after_the_sweep(monkeypatch: pytest.MonkeyPatch) -> None:
    listed: list[int] = []
    real = verification.charge

    def counted(m: fl.Model, s: int, *args: object) -> StringSum:
        if len(m) in (6, 24):  # the window check lists charges of 10-term windows only
            listed.append(s)
        return real(m, s, *args)  # type: ignore[arg-type]

    monkeypatch.setattr(verification, "charge", counted)
    # 24 terms: 2.6 x 10^4 independent sets; the sweep is estimated cheaper and decides
    big = fl.exclusion_chain(24, reach=2, couplings=[1 + j % 3 for j in range(24)])
    parts = verification._Parts(fl.analyze(big))
    assert parts.sweep_seconds() < parts.pairwise_seconds()
    r = fl.verify(big)
    assert r.ok and listed == []  # nothing listed: [H, Q(s)] is read off the sweep
    assert "sweep" in r["[H, Q(s)] = 0"].method and "r = 1" in r["[H, Q(s)] = 0"].detail
    # 6 terms: a few dozen products, listing them is estimated cheaper than the sweep
    small = fl.exclusion_chain(6, reach=2, couplings=rational(6))
    parts = verification._Parts(fl.analyze(small))
    assert parts.pairwise_seconds() < parts.sweep_seconds()
    r = fl.verify(small)
    assert r.ok and listed and "string algebra" in r["[H, Q(s)] = 0"].method


@pytest.mark.parametrize(
    "text",
    [
        "0.7 X0 + 1.3 Z0 Z1 + 0.4 X1 + 0.9 Z1 Z2 + 1.1 X2 + 0.6 Z2 Z3 + 0.8 X3",
        "0.8 X0 X1 + 1.1 Y1 Y2 + 0.7 X2 X3 + 1.3 Y3 Y4 + 0.9 X4 X5",
        "(0.7+0.3j) X0 + (1.1-0.2j) Z0 Z1 + 0.5j X1 + 0.9 Z1 Z2 + (0.4+0.4j) X2",
    ],
    ids=["ising", "xy", "complex-ising"],
)
def test_both_routes_agree_on_line_graphs_of_trees(text: str) -> None:
    # a line graph of a tree is claw-free and even-hole-free: the single polynomial
    # (Elman-Chapman-Flammia 2021) and the Majorana route (Chapman-Flammia 2020) must agree
    m = fl.parse_model(text)
    r = fl.verify(m)
    check = r[verification.ROUTES]
    assert check.passed, check.detail
    assert check.value < 1e-10
    assert r.ok, r.problems
    # the outside reference for both: numpy's eigenvalues (eigvals: complex couplings give a
    # non-Hermitian H), matched one to one with scipy
    from scipy.optimize import linear_sum_assignment

    exact = np.linalg.eigvals(m.to_sparse().toarray())
    table = fl.free_spectrum(m).levels(None)
    free = np.repeat(table.energies, table.multiplicity)
    cost = np.abs(free[:, None] - exact[None, :])
    rows, cols = linear_sum_assignment(cost)
    assert cost[rows, cols].max() < 1e-9


def test_routes_check_fails_when_the_quasi_energies_disagree() -> None:
    # the check can fail: a spectrum of other couplings put in place of the model's
    m = fl.parse_model("0.7 X0 + 1.3 Z0 Z1 + 0.4 X1 + 0.9 Z1 Z2 + 1.1 X2")
    other = fl.parse_model("0.7 X0 + 1.3 Z0 Z1 + 0.4 X1 + 0.9 Z1 Z2 + 1.2 X2")
    parts = verification._Parts(fl.analyze(m))
    parts._spectrum = (fl.free_spectrum(other), "")
    check = verification.routes_check(parts)
    assert check.passed is False and check.value > 1e-3


def test_sector_route_with_complex_couplings_is_verified() -> None:
    # a non-Hermitian ladder with two plaquettes: the sector levels against numpy's eigvals
    rng = np.random.default_rng(9)
    m = fl.parse_model("X0 X1 + Y1 Y2 + X3 X4 + Y4 Y5 + Z0 Z3 + Z1 Z4 + Z2 Z5")
    m = m.with_couplings(list(rng.normal(size=len(m)) + 1j * rng.normal(size=len(m))))
    r = fl.verify(m)
    assert r[verification.SECTORS].passed, r[verification.SECTORS].detail
    assert r.ok, r.problems
