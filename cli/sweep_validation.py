"""``slackline sweep ... --test HELDOUT.csv``: a fixed validation set beside cross-validation.

The held-out rows are read by the data's feature and label names; for each C
of the grid the fit on all points is applied to them (solver.study.validation).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from solver.files import HeldOutPoints, read_new_rows
from solver.study import heldout_errors


def add_validation_argument(group) -> None:
    group.add_argument("--test", metavar="HELDOUT.csv",
                       help="labelled rows kept out of the fit: their error at each C is "
                            "reported beside the cross-validated error")


@dataclass(frozen=True)
class HeldOutCurve:
    source: str
    rows: int
    C: np.ndarray
    errors: np.ndarray          # NaN where the fit at that C failed

    def add_to_json(self, data: dict) -> dict:
        """Each of ``data``'s steps gets its "heldout_error"; "heldout" names the rows."""
        for step, error in zip(data["steps"], self.errors):
            step["heldout_error"] = None if math.isnan(error) else float(error)
        data["heldout"] = {"source": self.source, "rows": self.rows}
        return data

    def add_to(self, table_rows: list) -> list:
        for row, error in zip(table_rows, self.errors):
            row["heldout_error"] = float(error)
        return table_rows

    def text(self) -> str:
        best = int(np.nanargmin(self.errors)) if np.isfinite(self.errors).any() else None
        lines = [f"held-out error on {self.rows} rows of {self.source} (a fixed validation "
                 "set, kept out of every fit):"]
        for C, error in zip(self.C, self.errors):
            mark = "   <- lowest" if best is not None and C == self.C[best] else ""
            shown = "fit failed" if math.isnan(error) else f"{error:.3f}"
            lines.append(f"  C = {C:>10.4g}  {shown}{mark}")
        return "\n".join(lines)


def heldout_curve(args, dataset, sweep) -> HeldOutCurve | None:
    if not getattr(args, "test", None):
        return None
    rows = read_new_rows(args.test, dataset.feature_names, dataset.label_name,
                         dataset.label_mapping, drop_incomplete=args.drop_incomplete)
    points = HeldOutPoints.from_rows(rows)
    C = np.asarray(sweep.C, dtype=float)
    errors = heldout_errors(dataset.X, dataset.y, sweep.config, C, points.X, points.signs)
    return HeldOutCurve(source=rows.source, rows=len(points), C=C, errors=errors)
