"""The class colours stay apart for readers with the three common colour-vision
deficiencies and in greyscale, and the classes differ by marker shape too.

Simulation: colorspacious' "sRGB1+CVD" space (Machado, Oliveira & Fernandes,
"A physiologically-based model for simulation of color vision deficiency",
IEEE TVCG 2009) at severity 100 (protanopia, deuteranopia, tritanopia).
Distances are CIEDE2000 (colorspacious.deltaE).  The bar of 20 is common
practice for "clearly different at a glance", no source; 2.3 is the just
noticeable difference usually quoted for CIELAB (Sharma, Digital Color Imaging
Handbook, 2003 — from memory).
"""

import numpy as np
import pytest

pytest.importorskip("colorspacious")
from colorspacious import cspace_convert, deltaE  # noqa: E402

from app.canvas.palette import palette  # noqa: E402

CLEARLY_DIFFERENT = 20.0
DEFICIENCIES = ("protanomaly", "deuteranomaly", "tritanomaly")


def _rgb(hex_colour: str) -> np.ndarray:
    return np.array([int(hex_colour[i:i + 2], 16) for i in (1, 3, 5)]) / 255.0


def _seen_with(rgb: np.ndarray, deficiency: str) -> np.ndarray:
    space = {"name": "sRGB1+CVD", "cvd_type": deficiency, "severity": 100}
    return np.clip(cspace_convert(rgb, space, "sRGB1"), 0, 1)


def _grey(rgb: np.ndarray) -> np.ndarray:
    lightness = cspace_convert(rgb, "sRGB1", "CIELab")[0]
    return np.clip(cspace_convert([lightness, 0, 0], "CIELab", "sRGB1"), 0, 1)


@pytest.mark.parametrize("deficiency", DEFICIENCIES)
def test_the_two_classes_stay_apart_with_a_colour_vision_deficiency(deficiency):
    positive, negative = (_rgb(palette()[k]) for k in ("positive", "negative"))
    difference = deltaE(_seen_with(positive, deficiency), _seen_with(negative, deficiency),
                        input_space="sRGB1")
    assert difference >= CLEARLY_DIFFERENT


def test_the_two_classes_stay_apart_in_greyscale():
    positive, negative = (_rgb(palette()[k]) for k in ("positive", "negative"))
    assert deltaE(_grey(positive), _grey(negative), input_space="sRGB1") >= CLEARLY_DIFFERENT


@pytest.mark.parametrize("key", ["positive", "negative"])
def test_each_class_stands_out_from_its_own_shading(key):
    shade = "shade_" + key
    assert deltaE(_rgb(palette()[key]), _rgb(palette()[shade]),
                  input_space="sRGB1") >= CLEARLY_DIFFERENT


def test_the_classes_differ_by_marker_shape_and_have_dark_outlines():
    colours = palette()
    assert colours["positive_symbol"] != colours["negative_symbol"]
    lightness = cspace_convert(_rgb(colours["marker_outline"]), "sRGB1", "CIELab")[0]
    assert lightness < 20
