"""Colours and marker shapes of the canvas, read once from resources/palette.json."""

from __future__ import annotations

import json
from functools import lru_cache
from pathlib import Path

PALETTE_FILE = Path(__file__).resolve().parent.parent / "resources" / "palette.json"

_FALLBACK = {
    "positive": "#2166ac", "negative": "#e08214",
    "positive_symbol": "o", "negative_symbol": "t",
    "boundary": "#1a1a1a", "band": "#4d4d4d", "weight_vector": "#6a3d9a",
    "slack": "#b2182b", "support_ring": "#1a1a1a", "selection": "#00a884",
    "ghost": "#9e9e9e", "shade_positive": "#92c5de", "shade_negative": "#fdb863",
    "background": "#ffffff", "axis": "#404040",
}


@lru_cache(maxsize=1)
def palette() -> dict:
    """The palette, falling back to built-in values for any key the file lacks."""
    colours = dict(_FALLBACK)
    try:
        colours.update({k: v for k, v in json.loads(PALETTE_FILE.read_text()).items()
                        if k in _FALLBACK})
    except (OSError, ValueError):
        pass
    return colours


def class_colour(sign: int) -> str:
    return palette()["positive" if sign > 0 else "negative"]


def class_symbol(sign: int) -> str:
    return palette()["positive_symbol" if sign > 0 else "negative_symbol"]
