"""Colours and marker shapes of the canvas, read once from resources/palette.json."""

from __future__ import annotations

from functools import lru_cache

from solver.files import resource_json

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
    colours.update({k: v for k, v in resource_json("palette.json").items() if k in _FALLBACK})
    return colours


def class_colour(sign: int) -> str:
    return palette()["positive" if sign > 0 else "negative"]


def class_symbol(sign: int) -> str:
    return palette()["positive_symbol" if sign > 0 else "negative_symbol"]
