"""Messages a person reads: one line, bounded, long values and lists cut.

Every refusal names the offending value and says what to do; a value can be
a 200 MB line or a list of 20,000 column names, so whatever is quoted goes
through ``quote`` or ``listing`` first, and ``one_line`` bounds the whole.
"""

from __future__ import annotations

MESSAGE_LIMIT = 300     # characters in one message line
VALUE_LIMIT = 60        # characters of one quoted value
LISTED = 10             # items of a list quoted before "and N more"
ELLIPSIS = "\u2026"


def clip(text: str, limit: int = VALUE_LIMIT) -> str:
    """``text`` cut to ``limit`` characters with an ellipsis at the end."""
    text = str(text)
    return text if len(text) <= limit else text[:max(limit - 1, 0)] + ELLIPSIS


def quote(value, limit: int = VALUE_LIMIT) -> str:
    """repr of ``value`` (a long one cut), for messages: 'abc' or 'abcd…'."""
    if isinstance(value, str) and len(value) > limit:
        return repr(value[:limit - 3]) + ELLIPSIS
    return clip(repr(value), limit)


def listing(items, shown: int = LISTED, limit: int = VALUE_LIMIT, render=quote) -> str:
    """'a', 'b', 'c' and 7 more: the first ``shown`` items, each cut, the rest counted."""
    items = list(items)
    text = ", ".join(render(item, limit) for item in items[:shown])
    return text + (f" and {len(items) - shown} more" if len(items) > shown else "")


def one_line(text, limit: int = MESSAGE_LIMIT) -> str:
    """``text`` on one line of at most ``limit`` characters.

    A longer text loses its middle, not its end: the end usually says what
    to do.
    """
    text = " ".join(str(text).split())
    if len(text) <= limit:
        return text
    tail = limit // 3
    return text[:limit - tail - 3] + f" {ELLIPSIS} " + text[len(text) - tail + 1:]


def path_text(path, limit: int = 100) -> str:
    """A file name for messages; a long one keeps its end, where the name is."""
    text = str(path)
    return text if len(text) <= limit else ELLIPSIS + text[len(text) - limit + 1:]
