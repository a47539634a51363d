"""The table of scored rows (``slackline predict --csv``, the window's export).

One row per scored row: its line in the source file, the two features, the
decision value, the predicted label, the distance to the boundary and the
close-call flag (and the row's own label when the file had one).  Text cells
that a spreadsheet would run as formulas are neutralised; numbers stay numbers.
"""

from __future__ import annotations

import csv
import io

from solver.files.atomic import atomic_write_text
from solver.files.exports import neutralise


def scored_table(rows, scores, feature_names) -> tuple[list, list[list]]:
    """(header, rows) for NewRows ``rows`` and their Scores."""
    header = ["row", *feature_names, "decision", "label", "distance", "in_band"]
    if rows.labels is not None:
        header.append("true_label")
    table = []
    for i, line in enumerate(rows.lines):
        cells = [int(line), float(rows.X[i, 0]), float(rows.X[i, 1]),
                 float(scores.decision[i]), scores.labels[i], float(scores.distance[i]),
                 "yes" if scores.in_band[i] else "no"]
        if rows.labels is not None:
            cells.append(rows.labels[i])
        table.append(cells)
    return header, table


def scored_csv(rows, scores, feature_names) -> str:
    header, table = scored_table(rows, scores, feature_names)
    stream = io.StringIO()
    writer = csv.writer(stream, lineterminator="\n")
    writer.writerow([neutralise(cell) for cell in header])
    for cells in table:
        writer.writerow([neutralise(cell) for cell in cells])
    return stream.getvalue()


def write_scored_csv(path, rows, scores, feature_names) -> None:
    atomic_write_text(path, scored_csv(rows, scores, feature_names))
