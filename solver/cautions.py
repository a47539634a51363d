"""The cautions that travel with every classifier Slackline produces.

One home for the text: the About box, the report, the classifier file and the
line ``slackline fit`` and ``slackline export`` print on stderr all read it.
"""

CAUTIONS = (
    "A boundary tuned by eye on training points is not a validated model.",
    "Validate it on held-out data before relying on it.",
    "Where it decides about people, parts or patients, follow local regulations and "
    "licensed practice.",
)

# the same, as one line for a terminal
CAUTION_LINE = ("caution: a boundary tuned by eye on training points is not a validated "
                "model; validate on held-out data; where it decides about people, parts or "
                "patients, follow local regulations and licensed practice")


def caution_paragraph() -> str:
    return " ".join(CAUTIONS)
