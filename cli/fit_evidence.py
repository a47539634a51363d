"""The evidence options of ``slackline fit``: ``--test HELDOUT.csv`` and ``--influence``.

``--test`` scores labelled rows the fit never saw (read by the data's
feature and label names) and reports the held-out error, the confusion
counts named by the labels, and the close calls (|f| < 1).  ``--influence``
reports, for each support vector, what leaving it out would change
(solver.study.influence).
"""

from __future__ import annotations

import sys
from dataclasses import dataclass

from solver.files import HeldOutPoints, heldout_section, read_new_rows
from solver.study import (Confusion, Influence, Scores, confusion,
                          influence_of_support_vectors, score)


def add_evidence_arguments(parser) -> None:
    parser.add_argument("--test", metavar="HELDOUT.csv",
                        help="labelled rows kept out of the fit: report the held-out error, "
                             "confusion counts and close calls (--save stores them)")
    parser.add_argument("--influence", action="store_true",
                        help="for each support vector, what leaving it out would change (one "
                             "leave-out fit each: about 2 s at 10,000 points)")


@dataclass(frozen=True)
class Evidence:
    heldout: HeldOutPoints | None = None
    scores: Scores | None = None
    counts: Confusion | None = None
    influence: Influence | None = None
    source_lines: tuple = ()        # each training point's line in its file

    def heldout_section(self) -> dict | None:
        if self.heldout is None:
            return None
        return heldout_section(self.heldout, self.scores.decision, self.counts.to_dict())

    def to_json(self) -> dict:
        data = {}
        if self.heldout is not None:
            data["test"] = {"error": self.counts.error, "confusion": self.counts.to_dict(),
                            "rows": len(self.heldout), "close_calls": self.scores.close_calls,
                            "source": self.heldout.source}
        if self.influence is not None:
            data["influence"] = self.influence.to_json()
            data["influence_note"] = self.influence.note()
        return data

    def text(self) -> str:
        lines = []
        if self.heldout is not None:
            counts = self.counts
            lines.append(f"  held-out error {counts.error:.1%} on {counts.rows} rows of "
                         f"{self.heldout.source} ({counts.false_positive + counts.false_negative}"
                         f" wrong); close calls (|f| < 1): {self.scores.close_calls}")
            lines.extend("    " + line for line in counts.lines())
        if self.influence is not None:
            lines.extend(self.influence.lines(source_lines=self.source_lines))
        return "".join("\n" + line for line in lines)


def evidence_for(args, dataset, result) -> Evidence:
    """Whatever the evidence options ask for, computed for ``result``."""
    heldout = scores = counts = influence = None
    if args.test:
        rows = read_new_rows(args.test, dataset.feature_names, dataset.label_name,
                             dataset.label_mapping, drop_incomplete=args.drop_incomplete)
        heldout = HeldOutPoints.from_rows(rows)
        if rows.skipped:
            print(f"skipped held-out rows at line(s) {', '.join(map(str, rows.skipped))}",
                  file=sys.stderr)
        scores = score(result, heldout.X, dataset.label_mapping)
        counts = confusion(heldout.signs, scores.signs, dataset.label_mapping)
    if getattr(args, "influence", False):
        influence = influence_of_support_vectors(
            result, heldout=None if heldout is None else heldout.X)
    return Evidence(heldout=heldout, scores=scores, counts=counts, influence=influence,
                    source_lines=tuple(dataset.rows))
