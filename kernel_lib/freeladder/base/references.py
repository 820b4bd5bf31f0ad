"""Published sources, spelled once: every module cites them through these names."""

from __future__ import annotations

__all__ = [
    "ALCARAZ_PIMENTA_2020",
    "BAXTER_1989",
    "CHAPMAN_ELMAN_MANN_2023",
    "CHAPMAN_FLAMMIA_2020",
    "CHUDNOVSKY_SEYMOUR_2007",
    "ELMAN_CHAPMAN_FLAMMIA_2021",
    "FENDLEY_2014",
    "FENDLEY_2019",
    "KITAEV_2006",
    "LIEB_1994",
    "LIEB_SCHULTZ_MATTIS_1961",
    "MANN_ELMAN_WOOD_CHAPMAN_2024",
    "PFEUTY_1970",
    "ROBERTS_1969",
    "ROSE_TARJAN_LUEKER_1976",
]

CHAPMAN_FLAMMIA_2020 = "A. Chapman and S. T. Flammia, Quantum 4, 278 (2020), arXiv:2003.05465"
ELMAN_CHAPMAN_FLAMMIA_2021 = (
    "S. J. Elman, A. Chapman and S. T. Flammia, Commun. Math. Phys. 388, 969 (2021), "
    "arXiv:2012.07857"
)
CHAPMAN_ELMAN_MANN_2023 = "A. Chapman, S. J. Elman and R. L. Mann, arXiv:2305.15625 (2023)"
ALCARAZ_PIMENTA_2020 = (
    "F. C. Alcaraz and R. A. Pimenta, Phys. Rev. B 102, 121101(R) (2020), arXiv:2005.14622"
)
FENDLEY_2019 = "P. Fendley, J. Phys. A 52, 335002 (2019), arXiv:1901.08078"
FENDLEY_2014 = "P. Fendley, J. Phys. A 47, 075001 (2014)"
BAXTER_1989 = "R. J. Baxter, Phys. Lett. A 140, 155 (1989)"
PFEUTY_1970 = "P. Pfeuty, Ann. Phys. 57, 79 (1970)"
KITAEV_2006 = "A. Kitaev, Ann. Phys. 321, 2 (2006)"
LIEB_1994 = "E. H. Lieb, Phys. Rev. Lett. 73, 2158 (1994)"
LIEB_SCHULTZ_MATTIS_1961 = "E. Lieb, T. Schultz and D. Mattis, Ann. Phys. 16, 407 (1961)"
CHUDNOVSKY_SEYMOUR_2007 = "M. Chudnovsky and P. Seymour, J. Combin. Theory Ser. B 97, 350 (2007)"
MANN_ELMAN_WOOD_CHAPMAN_2024 = (
    "R. L. Mann, S. J. Elman, D. R. Wood and A. Chapman, arXiv:2408.09684 (2024)"
)
ROBERTS_1969 = (
    "F. S. Roberts, in Proof Techniques in Graph Theory, ed. F. Harary (Academic Press, 1969)"
)
ROSE_TARJAN_LUEKER_1976 = "D. J. Rose, R. E. Tarjan and G. S. Lueker, SIAM J. Comput. 5, 266 (1976)"
