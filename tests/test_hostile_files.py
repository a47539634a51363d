"""Experiment files are untrusted: nesting, integer size, duplicate keys and every
disagreement between stored fields are refused with a JSON path, by check as much as
by export (issue 10, class 5); and every --json output is strict JSON."""

import json

import pytest

from hostile_cli import data_csv, refused, resealed, succeeded, write_experiment  # noqa: F401
from solver.files.experiment import json_text


def _strict(text):
    """json.loads that refuses NaN and Infinity, as a strict reader does (RFC 8259)."""
    def refuse(name):
        raise ValueError(f"{name} is not JSON")
    return json.loads(text, parse_constant=refuse)


@pytest.fixture
def linear(tmp_path):
    return write_experiment(tmp_path, "linear.json")


@pytest.fixture
def poly(tmp_path):
    return write_experiment(tmp_path, "poly.json", kernel="polynomial", degree=2,
                            scaling="zscore")


@pytest.fixture
def rbf(tmp_path):
    return write_experiment(tmp_path, "rbf.json", kernel="rbf", gamma=1.0, scaling="zscore")


def _both_commands(path, tmp_path):
    return [["check", path], ["export", path, "--points", tmp_path / "out.csv"]]


@pytest.mark.parametrize("command", [0, 1])
def test_a_duplicate_key_is_refused_with_its_path(capsys, linear, tmp_path, command):
    text = linear.read_text().replace('"C": 1.0,', '"C": 1000.0, "C": 1.0,', 1)
    assert text != linear.read_text()
    linear.write_text(text)
    refused(capsys, _both_commands(linear, tmp_path)[command], [linear],
            r"names a key twice in one object \('C'\)", problems=True)
    assert not (tmp_path / "out.csv").exists()


def test_the_duplicate_key_problem_names_the_object_and_both_values(capsys, linear):
    linear.write_text(linear.read_text().replace('"C": 1.0,', '"C": 1000.0, "C": 1.0,', 1))
    main_line = refused(capsys, ["check", linear], [linear], r"names a key twice",
                        problems=True)
    assert main_line
    from cli.main import main
    main(["check", str(linear)])
    err = capsys.readouterr().err
    assert "/config: the key 'C' is written twice (first 1000.0, then 1.0)" in err


@pytest.mark.parametrize("command", ["check", "export", "render"])
def test_990_nested_arrays_are_refused_before_anything_recurses(capsys, linear, tmp_path,
                                                                command):
    document = json.loads(linear.read_text())
    document["written"]["platform"] = "[" * 990 + "]" * 990    # as text: harmless
    text = json_text(document).replace('"' + "[" * 990 + "]" * 990 + '"',
                                       "[" * 990 + "]" * 990)
    linear.write_text(text)
    argv = {"check": ["check", linear], "export": ["export", linear, "--classifier",
                                                   tmp_path / "m.json"],
            "render": ["render", linear, "-o", tmp_path / "r.png"]}[command]
    refused(capsys, argv, [linear], r"nests arrays and objects 99\d deep; an experiment nests "
                                    r"at most 16 deep")


def test_a_deeply_nested_note_in_a_version_0_file_is_refused(capsys, tmp_path):
    path = tmp_path / "old.json"
    path.write_text('{"format": "slackline-experiment", "version": 0, "points": '
                    '[[0, 0, 1], [1, 1, -1]], "note": ' + "[" * 2000 + "]" * 2000 + "}")
    refused(capsys, ["check", path], [path], r"nests arrays and objects 2001 deep")


def test_brackets_inside_text_do_not_count_as_nesting(capsys, linear, tmp_path):
    resealed(linear, lambda d: d.update(note="[" * 5000 + "{"))
    succeeded(capsys, ["export", linear, "--points", tmp_path / "p.csv"])


@pytest.mark.parametrize("where", ["C", "coordinate"])
def test_a_400_digit_integer_is_refused_before_it_meets_a_float(capsys, linear, where):
    big = "9" * 400
    text = linear.read_text()
    if where == "C":
        text = text.replace('"C": 1.0,', f'"C": {big},', 1)
    else:
        start = text.index('"x": [') + len('"x": [')
        text = text[:start] + big + text[text.index(",", start):]
    linear.write_text(text)
    refused(capsys, ["check", linear], [linear],
            r"a whole number with 400 digits .*\(at most 20 digits\)")


@pytest.mark.parametrize("weights, match", [
    (None, r"/results/model/feature_weights: expected a list of \d+"),
    ([0.5], r"/results/model/feature_weights: expected 6 entries"),
])
@pytest.mark.parametrize("command", [0, 1])
def test_a_sealed_polynomial_experiment_with_broken_weights_is_refused(
        capsys, poly, tmp_path, weights, match, command):
    resealed(poly, lambda d: d["results"]["model"].update(feature_weights=weights))
    refused(capsys, _both_commands(poly, tmp_path)[command], [poly],
            r"not a valid experiment file", problems=True)
    from cli.main import main
    main([str(a) for a in _both_commands(poly, tmp_path)[command]])
    import re
    assert re.search(match, capsys.readouterr().err)


@pytest.mark.parametrize("edit, path", [
    (lambda d: d["results"].update(weight_norm=0.0), "/results/weight_norm"),
    (lambda d: d["results"].update(margin_width=123.0), "/results/margin_width"),
    (lambda d: d["results"].update(w=[9.0, 9.0]), "/results/w"),
    (lambda d: d["results"]["model"].update(kernel="rbf"), "/results/model/kernel"),
    (lambda d: d["results"]["model"]["scale"].__setitem__(0, 0.0), "/results/model/scale/0"),
    (lambda d: d["results"].update(support=[0, 0]), "/results/support/1"),
    (lambda d: d["results"]["alpha"].__setitem__(0, -1.0), "/results/alpha/0"),
    (lambda d: d["results"].update(slack=d["results"]["slack"][:-1]), "/results/slack"),
])
def test_every_disagreement_between_stored_fields_is_named_by_path_under_check(
        capsys, linear, edit, path):
    resealed(linear, edit)
    refused(capsys, ["check", linear], [linear], r"not a valid experiment file",
            problems=True)
    from cli.main import main
    main(["check", str(linear)])
    assert f"  {path}:" in capsys.readouterr().err


def test_an_rbf_experiment_whose_coefficients_miss_a_vector_is_refused(capsys, rbf, tmp_path):
    resealed(rbf, lambda d: d["results"]["model"].update(
        coefficients=d["results"]["model"]["coefficients"][:-1]))
    refused(capsys, ["export", rbf, "--classifier", tmp_path / "m.json"], [rbf],
            r"not a valid experiment file", problems=True)


def test_a_pipe_instead_of_an_experiment_is_refused_without_waiting(capsys, tmp_path):
    import os
    pipe = tmp_path / "e.json"
    os.mkfifo(pipe)
    refused(capsys, ["check", pipe], [], r"is not a regular file \(a pipe")


# -- strict JSON out -------------------------------------------------------------------
def test_fit_json_with_a_tiny_gamma_is_strict_json(capsys, data_csv):
    out, _ = succeeded(capsys, ["fit", data_csv, "--positive", "pass", "--kernel", "rbf",
                                "--gamma", "1e-3", "--json"])
    _strict(out)


def test_check_json_reports_an_infinite_difference_as_null_and_says_why(capsys, linear,
                                                                          monkeypatch):
    import cli.check
    from solver.study.agreement import Agreement
    monkeypatch.setattr(cli.check, "agreement", lambda stored, fresh, *args: [
        Agreement("w", float("inf"), 0.0, "present in only one of them")])
    from cli.main import main
    assert main(["check", str(linear), "--json"]) == 1
    data = _strict(capsys.readouterr().out)
    assert data["comparisons"][0]["difference"] is None
    assert data["non_finite_numbers"] == {"/comparisons/0/difference": "infinity"}


def test_sweep_json_is_strict_json(capsys, data_csv):
    out, _ = succeeded(capsys, ["sweep", data_csv, "--positive", "pass", "--steps", "3",
                                "--folds", "3", "--json"])
    _strict(out)


def test_an_experiment_whose_weight_norm_is_0_exports_nothing(capsys, linear, tmp_path):
    # it used to export +-inf distances (y f / |w|) with exit 0
    resealed(linear, lambda d: d["results"].update(weight_norm=0.0, margin_width=None))
    refused(capsys, ["export", linear, "--points", tmp_path / "p.csv"], [linear],
            r"not a valid experiment file", problems=True)
    assert not (tmp_path / "p.csv").exists()
