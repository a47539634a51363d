"""The C path in plain words: one sentence per event, and where the support set moves.

    at C = 0.42, point #17 moves from outside the band onto its edge

Point numbers are row indices from 0, as ``fit --json`` and the inspector show them.
"""

from __future__ import annotations

import math
from collections import Counter

_FROM = {
    "outside": "from outside the band",
    "on_margin": "from the band's edge",
    "inside": "from inside the band",
    "misclassified": "from the wrong side of the boundary",
}
_TO = {
    "outside": "out of the band",
    "on_margin": "onto its edge",
    "inside": "into the band",
    "misclassified": "to the wrong side of the boundary",
}


def c_text(C: float) -> str:
    """C with three significant figures."""
    return f"{C:.3g}" if C < 1e5 else f"{C:.2e}"


def event_sentence(event) -> str:
    return (f"at C = {c_text(event.C)}, point #{event.point} moves "
            f"{_FROM[event.before]} {_TO[event.after]}")


def busiest_breakpoints(path, count: int = 3) -> list[tuple[float, int]]:
    """The C values (binned by a tenth of a decade) where most points change status:
    [(C, number of events)], the busiest first."""
    bins = Counter()
    first_c = {}
    for event in path.events:
        key = round(math.log10(event.C), 1)
        bins[key] += 1
        first_c.setdefault(key, event.C)
    return [(first_c[key], n) for key, n in bins.most_common(count)]


def summary_lines(path, near: float, count: int = 5) -> list[str]:
    lines = [f"{len(path.breakpoints)} breakpoints, {len(path.events)} events over C = "
             f"{c_text(path.c_from)} .. {c_text(path.c_to)} (computed in "
             f"{path.seconds:.2f} s)"]
    busy = busiest_breakpoints(path)
    if busy:
        lines.append("the support set changes most near C = " + ", ".join(
            f"{c_text(C)} ({n} events)" for C, n in busy))
    if path.hard_margin_from is not None:
        lines.append(f"from C = {c_text(path.hard_margin_from)} on, the solution is the hard "
                     f"margin (the classes are separable)")
    for anchor in path.reanchors:
        lines.append(f"re-anchored with a QP solve at C = {c_text(anchor.C)}: {anchor.reason}")
    nearby = path.events_near(near, count)
    if nearby:
        lines.append(f"events near C = {c_text(near)}:")
        lines.extend(f"  {event_sentence(event)}" for event in nearby)
    return lines
