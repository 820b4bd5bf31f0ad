"""Foundations shared by every part: frozen results, errors, caches, JSON, the display (numbers
in text, HTML and LaTeX, and the renderings of results), HTML tables, references, scalars.
"""

from .cache import (
    cached,
    model_store,
    structure_store,
)
from .display import (
    DIGITS,
    bound_text,
    digits_for,
    number_html,
    number_latex,
    number_text,
    tex_escape,
)
from .errors import (
    CheckNotApplicable,
    NoTheoremError,
    TooLargeError,
)
from .frozen import (
    readonly_array,
    readonly_mapping,
    readonly_sparse,
)
from .htmltable import (
    field_table,
    grid_table,
    is_number_text,
)
from .jsonready import (
    json_ready,
)
from .references import (
    ALCARAZ_PIMENTA_2020,
    BAXTER_1989,
    CHAPMAN_ELMAN_MANN_2023,
    CHAPMAN_FLAMMIA_2020,
    CHUDNOVSKY_SEYMOUR_2007,
    ELMAN_CHAPMAN_FLAMMIA_2021,
    FENDLEY_2014,
    FENDLEY_2019,
    KITAEV_2006,
    LIEB_1994,
    LIEB_SCHULTZ_MATTIS_1961,
    MANN_ELMAN_WOOD_CHAPMAN_2024,
    PFEUTY_1970,
)
from .scalars import (
    MAX_EXPANDED_TERMS,
    Scalar,
    as_complex,
    check_scalar,
    exact_to_sympy,
    exact_value,
    expand_exact,
    expanded_terms_bound,
    is_exact_scalar,
    is_symbolic,
    substitute,
    substitution_map,
    to_fmpq,
    to_python_number,
    to_sympy,
)

__all__ = [
    "ALCARAZ_PIMENTA_2020",
    "BAXTER_1989",
    "CHAPMAN_ELMAN_MANN_2023",
    "CHAPMAN_FLAMMIA_2020",
    "CHUDNOVSKY_SEYMOUR_2007",
    "CheckNotApplicable",
    "DIGITS",
    "ELMAN_CHAPMAN_FLAMMIA_2021",
    "FENDLEY_2014",
    "FENDLEY_2019",
    "KITAEV_2006",
    "LIEB_1994",
    "LIEB_SCHULTZ_MATTIS_1961",
    "MANN_ELMAN_WOOD_CHAPMAN_2024",
    "MAX_EXPANDED_TERMS",
    "NoTheoremError",
    "PFEUTY_1970",
    "Scalar",
    "TooLargeError",
    "as_complex",
    "bound_text",
    "cached",
    "check_scalar",
    "digits_for",
    "exact_to_sympy",
    "exact_value",
    "expand_exact",
    "expanded_terms_bound",
    "field_table",
    "grid_table",
    "is_exact_scalar",
    "is_number_text",
    "is_symbolic",
    "json_ready",
    "model_store",
    "number_html",
    "number_latex",
    "number_text",
    "readonly_array",
    "readonly_mapping",
    "readonly_sparse",
    "structure_store",
    "substitute",
    "substitution_map",
    "tex_escape",
    "to_fmpq",
    "to_python_number",
    "to_sympy",
]
