"""The optional "heldout" section of an experiment file.

Labelled points kept out of the fit, and what the stored fit says about
them: the decision value of each, the error and the confusion counts.
``slackline check`` re-computes them from a fresh fit.  Absent (or null):
no held-out points, which is what every file of an older format version
migrates to.

    "heldout": {"source": {"file": ..., "sha256": ...} or null,
                "points": [{"x": [x1, x2], "label": ..., "line": n}, ...],
                "decision": [f, ...], "error": e,
                "confusion": {"positive_label": ..., "negative_label": ...,
                              "true_positive": n, "false_positive": n,
                              "true_negative": n, "false_negative": n}}
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from solver.errors import InputError
from solver.files.schema_check import short


@dataclass(frozen=True, eq=False)
class HeldOutPoints:
    X: np.ndarray               # n x 2, original units
    labels: tuple               # as written, each one of the experiment's labels
    signs: np.ndarray           # +1 / -1 by the experiment's mapping
    lines: tuple = ()           # line of each point in its file, when read from one
    source: str | None = None   # file name
    sha256: str | None = None   # of the file's bytes

    def __len__(self) -> int:
        return len(self.X)

    @classmethod
    def from_rows(cls, rows) -> "HeldOutPoints":
        """From labelled ``NewRows`` (solver.files.new_rows)."""
        if rows.labels is None:
            raise InputError(f"{rows.source} has no label column, so its rows cannot serve as "
                             "held-out points; add the label column the experiment uses")
        return cls(X=rows.X, labels=rows.labels, signs=rows.signs, lines=rows.lines,
                   source=rows.source, sha256=rows.sha256)


def heldout_section(points: HeldOutPoints, decision, confusion: dict) -> dict:
    """The JSON section for ``points`` with the decision values and counts of a fit."""
    decision = np.asarray(decision, dtype=float)
    if decision.shape != (len(points),):
        raise InputError(f"one decision value per held-out point is needed: {len(points)} "
                         f"points, {decision.size} values")
    listed = []
    for i in range(len(points)):
        point = {"x": [float(points.X[i, 0]), float(points.X[i, 1])], "label": points.labels[i]}
        if len(points.lines) == len(points):
            point["line"] = int(points.lines[i])
        listed.append(point)
    wrong = confusion["false_positive"] + confusion["false_negative"]
    source = None
    if points.source is not None and points.sha256 is not None:
        source = {"file": str(points.source), "sha256": str(points.sha256)}
    return {"source": source, "points": listed, "decision": decision.tolist(),
            "error": wrong / len(points), "confusion": dict(confusion)}


def same_label(label):
    """Labels compare by value: 1 and 1.0 are the same label (as in experiment files)."""
    if isinstance(label, float) and label.is_integer():
        return int(label)
    return label


def heldout_from_section(section: dict, label_mapping: dict, key=same_label):
    """HeldOutPoints of a validated section (``key`` normalises labels as the file layer does)."""
    points = section["points"]
    labels = tuple(key(p["label"]) for p in points)
    source = section["source"] or {}
    return HeldOutPoints(X=np.array([p["x"] for p in points], dtype=float).reshape(-1, 2),
                         labels=labels,
                         signs=np.array([label_mapping[label] for label in labels], dtype=int),
                         lines=tuple(p["line"] for p in points)
                         if all("line" in p for p in points) else (),
                         source=source.get("file"), sha256=source.get("sha256"))


def section_problems(section, known_labels, key=same_label) -> list[str]:
    """What the schema cannot say: labels of the mapping, one decision value per point."""
    if section is None:
        return []
    problems = []
    keys = {key(k) for k in known_labels}
    for i, point in enumerate(section["points"]):
        if key(point["label"]) not in keys:
            problems.append(f"/heldout/points/{i}/label: expected one of "
                            f"{', '.join(short(k) for k in known_labels)} (the labels in "
                            f"/data/label_mapping); got {short(point['label'])}")
    if len(section["decision"]) != len(section["points"]):
        problems.append(f"/heldout/decision: expected {len(section['points'])} entries, one "
                        f"per held-out point; got {len(section['decision'])}")
    counted = sum(section["confusion"][k] for k in ("true_positive", "false_positive",
                                                    "true_negative", "false_negative"))
    if counted != len(section["points"]):
        problems.append(f"/heldout/confusion: the counts add up to {counted}, but there are "
                        f"{len(section['points'])} held-out points")
    return problems
