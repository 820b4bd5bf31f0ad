"""The census of translation-invariant chains (freeladder.studies.census).

References: the orbit counts are checked against a brute-force enumeration written here
independently (words of letters, union-find over the action of letter permutations and
reversal); free rows against numpy dense exact diagonalization; integrable rows by dense
commutators of the charges with H; the named families as the trade knows them (Ising: P. Pfeuty,
Ann. Phys. 57, 79 (1970); XY: E. Lieb, T. Schultz and D. Mattis, Ann. Phys. 16, 407 (1961);
reach-2 chain: P. Fendley, J. Phys. A 52, 335002 (2019); free parafermions: P. Fendley,
J. Stat. Mech. (2012) P11020 and J. Phys. A 47, 075001 (2014); XYZ chain not free: common
practice, it is interacting in the Jordan-Wigner fermions).
"""

from __future__ import annotations

import itertools
import re

import numpy as np
import pytest

import freeladder as fl
from freeladder.studies.census import census_orbits

# -- an independent brute force for N = 2 ------------------------------------------------------


def _words(support: int) -> list[str]:
    out = []
    for width in range(1, support + 1):
        for w in itertools.product("IXYZ", repeat=width):
            if w[0] != "I" and w[-1] != "I":
                out.append("".join(w))
    return out


def _brute_orbits(support: int, most: int) -> dict[frozenset[str], int]:
    """Type set -> orbit id, by union-find over letter permutations and reversal."""
    words = _words(support)
    sets = [frozenset(c) for k in range(1, most + 1) for c in itertools.combinations(words, k)]
    parent = {s: s for s in sets}

    def find(s: frozenset[str]) -> frozenset[str]:
        while parent[s] != s:
            parent[s] = parent[parent[s]]
            s = parent[s]
        return s

    for s in sets:
        for perm in itertools.permutations("XYZ"):
            table = str.maketrans("XYZ", "".join(perm))
            for flip in (False, True):
                image = frozenset((w[::-1] if flip else w).translate(table) for w in s)
                parent[find(image)] = find(s)
    roots = {}
    return {s: roots.setdefault(find(s), len(roots)) for s in sets}


def _word(text: str) -> str:
    """'Z0 X2' -> 'ZIX' (a type written from site 0)."""
    ops = {int(site): letter for letter, site in re.findall(r"([XYZ])(\d+)", text)}
    return "".join(ops.get(j, "I") for j in range(max(ops) + 1))


def _chain_text(words: list[str], length: int, rng: np.random.Generator) -> str:
    terms = []
    for w in words:
        for j in range(length - len(w) + 1):
            ops = " ".join(f"{c}{j + i}" for i, c in enumerate(w) if c != "I")
            terms.append(f"{rng.uniform(0.3, 1.7):.6f} {ops}")
    return " + ".join(terms)


@pytest.fixture(scope="module")
def small() -> object:
    return fl.census(states=2, support=2, types=2, progress=False)


def test_orbits_equal_a_brute_force_enumeration(small: object) -> None:
    df = small
    brute = _brute_orbits(2, 2)
    sizes: dict[int, int] = {}
    for orbit in brute.values():
        sizes[orbit] = sizes.get(orbit, 0) + 1
    assert len(df) == len(sizes)  # every orbit once
    seen = set()
    for types, size in zip(df["types"], df["orbit_size"], strict=True):
        orbit = brute[frozenset(_word(t) for t in types)]
        assert orbit not in seen
        seen.add(orbit)
        assert sizes[orbit] == size
    assert sum(df["orbit_size"]) == len(brute)


def test_verdict_is_the_same_on_every_member_of_an_orbit(small: object) -> None:
    # Checks the symmetry reduction itself: classify every type set, not just representatives.
    df = small
    brute = _brute_orbits(2, 2)
    verdict_of = {}
    for types, kind in zip(df["types"], df["verdict"], strict=True):
        verdict_of[brute[frozenset(_word(t) for t in types)]] = kind
    rng = np.random.default_rng(5)
    for members, orbit in brute.items():
        m = fl.parse_model(_chain_text(sorted(members), 7, rng))
        assert fl.classify(m).kind == verdict_of[orbit], sorted(members)


def test_free_rows_equal_dense_exact_diagonalization(small: object) -> None:
    df = small
    rng = np.random.default_rng(11)
    checked = {"single polynomial": 0, "sectors": 0}
    for types, spectrum in zip(df["types"], df["spectrum"], strict=True):
        if spectrum == "none":
            continue
        m = fl.parse_model(_chain_text([_word(t) for t in types], 8, rng))
        exact = np.linalg.eigvalsh(m.to_sparse().toarray())
        if spectrum == "single polynomial":
            table = fl.free_spectrum(m).levels(None)
            free = np.repeat(np.real(table.energies), table.multiplicity)
        else:
            energies, mult = fl.jordan_wigner_spectrum(m).levels()
            free = np.repeat(np.real(energies), mult)
        assert len(free) == len(exact) == 2**8
        np.testing.assert_allclose(np.sort(free), exact, atol=1e-9)
        checked[spectrum] += 1
    assert checked["single polynomial"] >= 5 and checked["sectors"] >= 1


def _shifted(text: str, j: int) -> str:
    return re.sub(r"([XYZ])(\d+)", lambda mo: f"{mo.group(1)}{int(mo.group(2)) + j}", text)


def test_integrable_rows_have_charges_that_commute_with_h() -> None:
    df = fl.census(states=4, support=2, types=1, progress=False)
    rng = np.random.default_rng(3)
    checked = 0
    for types, kind in zip(df["types"], df["verdict"], strict=True):
        if kind != "integrable":
            continue
        # 4 sites of N = 4 (dimension 256): every type at every position, random couplings.
        terms = [
            f"{rng.uniform(0.3, 1.7):.6f} {_shifted(t, j)}"
            for t in types
            for j in range(4 - max(int(s) for s in re.findall(r"[XYZ](\d+)", t)))
        ]
        m = fl.parse_model(" + ".join(terms), states=4)
        h = m.to_sparse().toarray()
        for s in (1, 2, 3):
            q = fl.charge(m, s).to_sparse().toarray()
            assert np.linalg.norm(h @ q - q @ h) <= 1e-9 * max(1.0, np.linalg.norm(q)), (types, s)
        checked += 1
    assert checked >= 1


def test_a_row_that_is_neither_has_a_charge_that_fails() -> None:
    # The commutator check above can fail: on an unsolved row it does.
    df = fl.census(states=2, support=2, types=2, progress=False)
    row = df[df["verdict"] == "unsolved"].iloc[0]
    m = fl.parse_model(_chain_text([_word(t) for t in row["types"]], 6, np.random.default_rng(1)))
    h = m.to_sparse().toarray()
    worst = max(
        np.linalg.norm(h @ q - q @ h)
        for q in (fl.charge(m, s).to_sparse().toarray() for s in (2, 3))
    )
    assert worst > 1e-3


def test_known_families_appear_with_their_names() -> None:
    df = fl.census(states=2, support=2, types=3, progress=False)
    named = dict(zip(df["name"], zip(df["verdict"], df["spectrum"], strict=True), strict=True))
    assert named["transverse-field Ising chain (Pfeuty 1970)"] == (
        "jordan-wigner",
        "single polynomial",
    )
    assert named["XY chain (Lieb, Schultz and Mattis 1961)"][0] == "jordan-wigner"
    field = "XY chain in a transverse field (Kitaev chain under Jordan-Wigner)"
    assert named[field][0] == "jordan-wigner"
    assert named["XYZ chain (Heisenberg type)"] == ("unsolved", "none")
    reach2 = fl.census(states=2, support=3, types=1, progress=False)
    row = reach2[reach2["name"] == "reach-2 exclusion chain (Fendley 2019)"].iloc[0]
    assert row["verdict"] == "hidden-free" and row["spectrum"] == "single polynomial"
    clock = fl.census(states=3, support=2, types=2, progress=False)
    row = clock[clock["name"] == "free parafermion chain (Fendley 2014)"].iloc[0]
    assert row["verdict"] == "hidden-free"


def test_every_row_says_how_far_its_verdict_is_known(small: object) -> None:
    assert all("lengths 7 and 8" in text for text in small["every_length"])
    assert all(len(model) > 0 for model in small["model"])


def test_processes_give_the_same_table(small: object, tmp_path: object) -> None:
    again = fl.census(states=2, support=2, types=2, executor="processes", progress=False)
    cols = ["types", "verdict", "theorem", "spectrum", "model", "orbit_size"]
    assert again[cols].equals(small[cols])


def test_census_file(tmp_path: object) -> None:
    import pandas as pd

    path = tmp_path / "census.csv"  # type: ignore[operator]
    df = fl.census(states=2, support=2, types=1, progress=False, path=path)
    back = pd.read_csv(path)
    assert list(back["verdict"]) == list(df["verdict"])
    assert list(back["types"]) == ["; ".join(t) for t in df["types"]]
    with pytest.raises(ValueError, match="csv or .parquet"):
        fl.census(states=2, support=1, types=1, progress=False, path=tmp_path / "x.txt")  # type: ignore[operator]


@pytest.mark.parametrize(
    ("kwargs", "message"),
    [
        ({"support": 0}, "support must be a positive integer"),
        ({"types": 0}, "types must be a positive integer"),
        ({"lengths": (3,)}, "lengths must be two integers"),
        ({"states": 2, "support": 6, "types": 4}, "more than the limit"),
    ],
)
def test_bad_arguments_are_refused(kwargs: dict[str, object], message: str) -> None:
    with pytest.raises(ValueError, match=message):
        fl.census(progress=False, **kwargs)  # type: ignore[arg-type]


def test_orbit_counts_for_single_types() -> None:
    # N = 2, one type on at most 2 sites: X/Y/Z on one site (1 orbit), two equal letters
    # (XX, YY, ZZ: 1 orbit), two different letters (6 words, 1 orbit): 3 (counted by hand).
    assert len(census_orbits(2, 2, 1)) == 3


def test_command_line_prints_the_same_rows(small: object) -> None:
    import json
    import subprocess
    import sys

    out = subprocess.run(
        [sys.executable, "-m", "freeladder", "census", "--support", "2", "--types", "2", "--json"],
        capture_output=True,
        text=True,
        check=True,
    ).stdout
    rows = json.loads(out)
    assert [tuple(r["types"]) for r in rows] == list(small["types"])
    assert [r["verdict"] for r in rows] == list(small["verdict"])
    bad = subprocess.run(
        [sys.executable, "-m", "freeladder", "census", "--support", "0"],
        capture_output=True,
        text=True,
    )
    assert bad.returncode == 2 and "support must be a positive integer" in bad.stderr
