"""A plain-words summary of a Comparison.

Every number in the text is read from the two results (or their settings);
nothing is estimated here.  Figures are written with three significant
digits, settings with up to six.
"""

from __future__ import annotations

from solver.study.compare import Comparison
from solver.result import INSIDE, MISCLASSIFIED

_NO_TURN_DEGREES = 0.05   # a turn this small is reported as "did not turn"


def number(value: float) -> str:
    """A measured figure: three significant digits."""
    return f"{value:.3g}"


def percent(fraction: float) -> str:
    """An error rate as a percentage, three significant digits."""
    return f"{100.0 * fraction:.3g}%"


def setting(value) -> str:
    """A setting as the user typed it (up to six significant digits)."""
    return f"{value:g}" if isinstance(value, (int, float)) and not isinstance(value, bool) \
        else str(value)


def summary(comparison: Comparison) -> str:
    """One or two sentences: the cause, then what happened to margin, band and boundary."""
    before, after = comparison.before, comparison.after
    first = f"{_cause(comparison)} {_margin_clause(comparison)}; {_band_clause(comparison)}"
    turn = _turn_clause(comparison)
    first += f", and {turn}." if turn else "."
    sentences = [first[0].upper() + first[1:]]
    support = _support_clause(comparison)
    if support:
        sentences.append(support)
    if comparison.cv_before is not None and comparison.cv_after is not None:
        sentences.append(f"The cross-validated error went from "
                         f"{percent(comparison.cv_before.error)} to "
                         f"{percent(comparison.cv_after.error)}.")
    if before.training_error != after.training_error:
        sentences.append(f"The training error went from {percent(before.training_error)} "
                         f"to {percent(after.training_error)}.")
    return " ".join(sentences)


def _cause(comparison: Comparison) -> str:
    parts = []
    changed = comparison.settings_changed
    before, after = comparison.before.config, comparison.after.config
    if "hard_margin" in changed:
        if after.hard_margin:
            parts.append(f"switching from C = {setting(before.C)} to a hard margin")
        else:
            parts.append(f"switching from a hard margin to C = {setting(after.C)}")
    elif "C" in changed and not after.hard_margin:
        verb = "lowering" if after.C < before.C else "raising"
        parts.append(f"{verb} C from {setting(before.C)} to {setting(after.C)}")
    for name, label in (("kernel", "the kernel"), ("gamma", "gamma"), ("degree", "the degree"),
                        ("offset", "offset"), ("weight_positive", "the weight of class +1"),
                        ("weight_negative", "the weight of class -1"),
                        ("scaling", "the scaling")):
        if name in changed:
            old, new = changed[name]
            parts.append(f"changing {label} from {setting(old)} to {setting(new)}")
    if comparison.moved:
        parts.append(f"moving {_count(len(comparison.moved), 'point')}")
    if comparison.added:
        parts.append(f"adding {_count(len(comparison.added), 'point')}")
    if comparison.removed:
        parts.append(f"removing {_count(len(comparison.removed), 'point')}")
    if not parts:
        return "refitting with the same settings and points"
    if len(parts) == 1:
        return parts[0]
    return ", ".join(parts[:-1]) + " and " + parts[-1]


def _margin_clause(comparison: Comparison) -> str:
    old, new = comparison.before.margin_width, comparison.after.margin_width
    where = "" if comparison.after.w is not None else " (in the kernel's feature space)"
    if number(old) == number(new):
        return f"left the margin width{where} at {number(new)} units"
    verb = "widened" if new > old else "narrowed"
    return f"{verb} the margin{where} from {number(old)} to {number(new)} units"


def _band_clause(comparison: Comparison) -> str:
    before, after = comparison.before, comparison.after
    inside_now, inside_then = after.count(INSIDE), before.count(INSIDE)
    wrong_now, wrong_then = after.count(MISCLASSIFIED), before.count(MISCLASSIFIED)
    verb = "sits" if inside_now == 1 else "sit"
    text = (f"{_count(inside_now, 'point')} now {verb} inside the band "
            f"({inside_then} before)")
    if wrong_now or wrong_then:
        text += f" and {wrong_now} {'is' if wrong_now == 1 else 'are'} misclassified " \
                f"({wrong_then} before)"
    return text


def _turn_clause(comparison: Comparison) -> str | None:
    angle = comparison.angle_degrees
    if angle is None:
        return None
    if abs(angle) < _NO_TURN_DEGREES:
        return "the boundary did not turn"
    return f"the boundary turned {number(abs(angle))} degrees"


def _support_clause(comparison: Comparison) -> str | None:
    joined, left = len(comparison.joined), len(comparison.left)
    if not joined and not left:
        return None
    parts = []
    if joined:
        parts.append(f"{_count(joined, 'support vector')} joined")
    if left:
        parts.append(f"{_count(left, 'support vector') if not joined else left} left")
    return " and ".join(parts) + "."


def _count(n: int, noun: str) -> str:
    return f"{n} {noun}" if n == 1 else f"{n} {noun}s"
