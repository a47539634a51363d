"""How a class is named on screen: the user's label and its code, once each.

A class shows as "seal held (+1)": the label the user's file gives it and the
code the solver uses.  When the label is the code itself (a new document, or a
file whose labels are 1 and -1) the code is not repeated: "+1", not "+1 (+1)".
"""

from __future__ import annotations

MINUS = "\u2212"


def code(sign: int) -> str:
    """The class code as printed: +1 or −1 (a minus sign, not a hyphen)."""
    return "+1" if sign > 0 else f"{MINUS}1"


def caption(label, sign: int, gap: str = " ") -> str:
    """``label`` with its class code in brackets, or the code alone when the label is it."""
    text = str(label)
    if _is_code(text, sign):
        return code(sign)
    return f"{text}{gap}({code(sign)})"


def _is_code(text: str, sign: int) -> bool:
    try:
        return float(text.strip().replace(MINUS, "-")) == (1.0 if sign > 0 else -1.0)
    except ValueError:
        return False
