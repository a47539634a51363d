"""In which units a distance or the margin width is: words for the read-outs.

For a linear fit, w, b, distances and the margin width are in the data's own
units, also when the fit ran on scaled features (the solver converts them
back).  A kernel fit has no w in the plane: its margin width 2/|w| and the
distances y·f/|w| live in the kernel's feature space.
"""

from __future__ import annotations

SCALING_WORDS = {"none": "", "zscore": "z-scored", "range": "range-scaled"}


def length_suffix(result, units) -> str:
    """What to write after a length: " um", "" (no or mixed units) or " (feature space)"."""
    if result.w is None:
        return " (feature space)"
    first, second = (units or ("", ""))[:2]
    return f" {first}" if first and first == second else ""


def units_sentence(result, units, feature_names=("x1", "x2")) -> str:
    """For the summary's units row: in which units w, b, margin width and distances are."""
    scaled = SCALING_WORDS.get(result.config.scaling, result.config.scaling)
    if result.w is None:
        of = f" of the {scaled} features" if scaled else ""
        return f"the kernel's feature space{of}, not the data's units"
    first, second = (units or ("", ""))[:2]
    back = f", converted back from the {scaled} features the fit ran on" if scaled else ""
    if first and first == second:
        where = f"the data's own ({first})"
    elif first or second:
        names = [f"{n} in {u or 'no unit'}" for n, u in zip(feature_names, (first, second))]
        where = f"the data's own ({', '.join(names)}: a distance mixes them)"
    else:
        where = "the data's own (the file names none)"
    return f"{where}{back}"
