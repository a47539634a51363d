"""The importer's messages in the import dialog's own words.

The file layer speaks to the command line ("say which one ... with
--positive"); in the dialog the same choice is a control with a name.  Each
rule turns a command-line phrase into the name of the control that does it.
"""

from __future__ import annotations

import re

POSITIVE = "\u201cpositive class (+1)\u201d"
FEATURES = "\u201cfeature on the x axis\u201d and \u201cfeature on the y axis\u201d"
SKIP = "\u201cskip rows with a missing or non-numeric value\u201d"

RULES = (
    (r"say which one is the positive class with --positive",
     f"choose which one is the positive class under {POSITIVE} below"),
    (r"--positive ('[^']*'|\S+) is not one of", r"the positive class \1 is not one of"),
    (r"name them with --features \S+", f"pick two other columns under {FEATURES} below"),
    (r"skip them with --drop-incomplete", f"tick {SKIP} below to skip them"),
)


def plain(message: str) -> str:
    """``message`` with every command-line phrase replaced by the dialog's words."""
    for pattern, words in RULES:
        message = re.sub(pattern, words, message)
    return message
