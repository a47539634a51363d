"""Colours and marker shapes of the canvas, read once from resources/palette.json."""

from __future__ import annotations

from functools import lru_cache

from solver.files import resource_json

# every key the canvas reads; resources/palette.json gives the values
KEYS = ("positive", "negative", "positive_symbol", "negative_symbol", "marker_outline",
        "boundary", "band", "weight_vector", "slack", "support_ring", "selection", "ghost",
        "shade_positive", "shade_negative", "background", "axis")


@lru_cache(maxsize=1)
def palette() -> dict:
    """The palette of resources/palette.json (a missing key is a KeyError here, at start)."""
    stored = resource_json("palette.json")
    return {key: stored[key] for key in KEYS}


def class_colour(sign: int) -> str:
    return palette()["positive" if sign > 0 else "negative"]


def class_symbol(sign: int) -> str:
    return palette()["positive_symbol" if sign > 0 else "negative_symbol"]
