"""What the experiment schema cannot say: stored fields that must agree with each other.

Runs after the schema check (so every field has its type) and before the
checksum; every disagreement is one problem with its JSON path.  A sealed
file can still be inconsistent (a checksum only says nobody edited it since
it was sealed), and ``check`` and ``export`` read the same problems, so
``check`` never agrees with a file ``export`` cannot use.

    labels       each point's label is one of the two in /data/label_mapping
    lengths      alpha, slack, decision, status: one entry per point
    support      indices in range, none listed twice, alpha >= 0
    norms        weight_norm > 0 and finite (distances divide by it), or 0 with
                 margin_width null for a linear fit whose w is 0;
                 margin_width = 2 / weight_norm; linear: w = feature_weights / scale
                 and |w| = weight_norm
    model        kernel and its parameters as in /config; scale > 0;
                 feature_weights one per column of the feature map (linear 2,
                 polynomial one per monomial), support_vectors and
                 coefficients one per support vector (rbf)
    points       within the coordinate limit of solver.limits

Stored decision values, slacks and alphas are not recomputed here: how far
they are from a fresh fit is ``check``'s question (drift, exit 1), not a
defect of the file.
"""

from __future__ import annotations

import math

from solver.config import FitConfig
from solver import limits
from solver.errors import InputError
from solver.files.heldout_points import section_problems
from solver.files.schema_check import cap, short
from solver.kernels import polynomial

RELATIVE = 1e-6   # stored figures are rounded to a float's repr: far tighter than this


def label_key(label):
    """Labels compare by value: 1 and 1.0 are the same label (as in the source table)."""
    if isinstance(label, float) and label.is_integer():
        return int(label)
    return label


def consistency_problems(document: dict) -> list[str]:
    problems = _label_problems(document)
    labels = [m["label"] for m in document["data"]["label_mapping"]]
    problems += section_problems(document.get("heldout"), labels, key=label_key)
    try:
        FitConfig.from_dict(document["config"])
    except (InputError, TypeError) as exc:
        problems.append(f"/config: {exc}")
        return cap(problems)
    problems += _coordinate_problems(document["points"])
    results, n = document["results"], len(document["points"])
    if results is not None:
        problems += _per_point_problems(results, n)
        problems += _norm_problems(results)
        problems += _model_problems(results, document["config"])
    return cap(problems)


def _coordinate_problems(points) -> list[str]:
    far = [i for i, p in enumerate(points) if max(abs(p["x"][0]), abs(p["x"][1])) >
           limits.COORDINATE]
    return [f"/points/{i}/x: coordinates beyond {limits.COORDINATE:g} in size, which no fit "
            f"accepts; got {short(points[i]['x'])}" for i in far[:5]]


def _label_problems(document) -> list[str]:
    problems = []
    mapping = document["data"]["label_mapping"]
    known = [m["label"] for m in mapping]
    if sorted(m["sign"] for m in mapping) != [-1, 1]:
        problems.append("/data/label_mapping: expected one label with sign 1 and one with "
                        f"sign -1; got signs {[m['sign'] for m in mapping]}")
    if label_key(known[0]) == label_key(known[1]):
        problems.append(f"/data/label_mapping: both entries name the label {short(known[0])}")
    keys = {label_key(k) for k in known}
    for i, point in enumerate(document["points"]):
        if label_key(point["label"]) not in keys:
            problems.append(f"/points/{i}/label: expected one of "
                            f"{', '.join(short(k) for k in known)} (the labels in "
                            f"/data/label_mapping); got {short(point['label'])}")
    return problems


def _per_point_problems(results, n) -> list[str]:
    problems = []
    for key in ("alpha", "slack", "decision", "status"):
        if len(results[key]) != n:
            problems.append(f"/results/{key}: expected {n} entries, one per point; "
                            f"got {len(results[key])}")
    seen = set()
    for j, index in enumerate(results["support"]):
        if index >= n:
            problems.append(f"/results/support/{j}: point index {index} is out of range "
                            f"(there are {n} points, numbered from 0)")
        elif index in seen:
            problems.append(f"/results/support/{j}: point {index} is listed twice")
        seen.add(index)
    negative = [i for i, a in enumerate(results["alpha"]) if a < 0]
    problems += [f"/results/alpha/{i}: expected alpha >= 0; got {short(results['alpha'][i])}"
                 for i in negative[:5]]
    return problems


def _norm_problems(results) -> list[str]:
    norm, width = results["weight_norm"], results["margin_width"]
    model, w = results["model"], results["w"]
    weights = model.get("feature_weights")
    if norm == 0 and width is None and model["kernel"] == "linear" and w is not None \
            and weights and not any(w) and not any(weights):
        return []          # w = 0 exactly (no line separates the classes): no margin
    if not (math.isfinite(norm) and norm > 0):
        return [f"/results/weight_norm: expected a positive number (distances and the margin "
                f"width 2/|w| divide by it), or 0 for a linear fit whose w is 0; "
                f"got {short(norm)}"]
    problems = []
    if width is None or not _close(width, 2.0 / norm):
        problems.append(f"/results/margin_width: expected 2 / weight_norm = {2.0 / norm:.10g}; "
                        f"got {short(width)}")
    if model["kernel"] == "linear" and w is not None and _lengths_ok(model, 2) \
            and all(math.isfinite(v) and v > 0 for v in model["scale"]):
        from_model = [fw / s for fw, s in zip(model["feature_weights"], model["scale"])]
        if not all(_close(a, b, scale=max(map(abs, from_model))) for a, b in zip(w, from_model)):
            problems.append(f"/results/w: expected feature_weights / scale = "
                            f"{short([float(f'{v:.10g}') for v in from_model])}; got {short(w)}")
        elif not _close(math.hypot(*w), norm):
            problems.append(f"/results/weight_norm: expected |w| = {math.hypot(*w):.10g}; "
                            f"got {short(norm)}")
    return problems


def _model_problems(results, config) -> list[str]:
    model, kernel = results["model"], config["kernel"]
    if model["kernel"] != kernel:
        return [f"/results/model/kernel: expected {short(kernel)} (the kernel in /config); "
                f"got {short(model['kernel'])}"]
    problems = []
    names = {"polynomial": ("gamma", "degree", "offset"), "rbf": ("gamma",)}.get(kernel, ())
    for name in names:
        if not _close(model[name], config[name]):
            problems.append(f"/results/model/{name}: expected {short(config[name])} (as in "
                            f"/config/{name}); got {short(model[name])}")
    bad_scale = [i for i, s in enumerate(model["scale"]) if not (math.isfinite(s) and s > 0)]
    problems += [f"/results/model/scale/{i}: expected a positive number; got "
                 f"{short(model['scale'][i])}" for i in bad_scale]
    if kernel == "linear":
        problems += _expect_list(results, "w", 2, "/results/w", "the linear kernel's w")
        problems += _expect_list(model, "feature_weights", 2, "/results/model/feature_weights",
                                 "one weight per feature")
    elif kernel == "polynomial":
        problems += _expect_none(results, "w", "/results/w", "a polynomial kernel")
        columns = _poly_columns(config)
        problems += _expect_list(model, "feature_weights", columns,
                                 "/results/model/feature_weights",
                                 f"one weight per monomial of degree {config['degree']}")
    elif kernel == "rbf":
        problems += _expect_none(results, "w", "/results/w", "an rbf kernel")
        vectors = model.get("support_vectors")
        count = len(vectors) if isinstance(vectors, list) else 0
        problems += _expect_list(model, "support_vectors", count,
                                 "/results/model/support_vectors", "the support vectors")
        problems += _expect_list(model, "coefficients", count,
                                 "/results/model/coefficients", "one per support vector")
    return problems


def _poly_columns(config) -> int:
    """Columns of the polynomial feature map: offset 0 drops the monomials with k > 0."""
    degree, offset = int(config["degree"]), config["offset"]
    return sum(1 for i, j, k in polynomial.exponents(degree)
               if polynomial._multinomial(degree, i, j, k, offset) != 0.0)


def _expect_list(owner, key, length, path, what) -> list[str]:
    value = owner.get(key)
    if not isinstance(value, list):
        return [f"{path}: expected a list of {length} ({what}); got {short(value)}"]
    if len(value) != length:
        return [f"{path}: expected {length} entries ({what}); got {len(value)}"]
    return []


def _expect_none(owner, key, path, what) -> list[str]:
    value = owner.get(key)
    return [] if value is None else [f"{path}: expected null for {what}; got {short(value)}"]


def _lengths_ok(model, n) -> bool:
    weights = model.get("feature_weights")
    return isinstance(weights, list) and len(weights) == n


def _close(a, b, scale=None) -> bool:
    if a is None or b is None:
        return a is b
    scale = max(abs(a), abs(b)) if scale is None else scale
    return abs(a - b) <= RELATIVE * scale
