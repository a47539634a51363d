"""Experiment files: round trips, provenance, the checksum and schema problems with paths."""

import json

import numpy as np
import pytest

from solver import FitConfig, fit
from solver.files.dataset import Dataset, load_table
from solver.errors import FileFormatError, InputError
from solver.files.experiment import (content_checksum, experiment_from_dict, experiment_to_dict,
                               load_experiment, save_experiment)

# Invented demo points: two gauge readings on six parts, pass (+1) / fail (-1).
X = np.array([[1.0, 0.5], [2.0, 0.6], [1.5, 0.4], [8.0, 1.3], [9.0, 1.1], [7.5, 1.4]])
Y = np.array([1, 1, 1, -1, -1, -1])


def gauges() -> Dataset:
    return Dataset.from_points(X, Y, feature_names=("bore", "roughness"), units=("um", "um"),
                               label_mapping={"pass": 1, "fail": -1}, label_name="inspection")


@pytest.fixture
def saved(tmp_path):
    result = fit(X, Y, FitConfig(C=2.0, scaling="zscore"))
    path = save_experiment(tmp_path / "e.json", gauges(), result, note="first pilot batch")
    return path, result


def test_save_then_load_gives_the_same_points_labels_and_mapping(saved):
    path, _ = saved
    assert load_experiment(path).dataset == gauges()


def test_save_then_load_gives_the_same_configuration(saved):
    path, result = saved
    assert load_experiment(path).config == result.config


def test_save_then_load_gives_the_same_figures_bit_for_bit(saved):
    path, result = saved
    results = load_experiment(path).results
    # expected values: the FitResult that was saved (JSON keeps a float's repr exactly)
    assert results["alpha"] == result.alpha.tolist()
    assert results["decision"] == result.decision.tolist()
    assert results["w"] == result.w.tolist()
    assert results["b"] == result.b
    assert results["support"] == result.support.tolist()
    assert results["status"] == result.status.tolist()


def test_the_note_survives_a_round_trip(saved):
    path, _ = saved
    assert load_experiment(path).note == "first pilot batch"


def test_provenance_names_the_software_versions(saved):
    import cvxopt

    path, _ = saved
    written = load_experiment(path).written
    assert written["numpy"] == np.__version__
    assert written["cvxopt"] == cvxopt.__version__
    assert {"at", "slackline", "python"} <= set(written)


def test_an_imported_table_keeps_its_source_name_sha256_and_lines(tmp_path):
    table = tmp_path / "g.csv"
    table.write_text("a [mm],b [mm],ok\n1,2,1\nx,3,1\n4,5,-1\n6,6,-1\n", encoding="utf-8")
    data = load_table(table, drop_incomplete=True)
    path = save_experiment(tmp_path / "e.json", data, None, config=FitConfig())
    assert load_experiment(path).dataset == data


def test_points_without_a_fit_are_saved_with_null_results(tmp_path):
    path = save_experiment(tmp_path / "e.json", gauges(), None, config=FitConfig(C=3.0))
    experiment = load_experiment(path)
    assert experiment.results is None
    assert experiment.config.C == 3.0


def test_a_kernel_fit_round_trips(tmp_path):
    result = fit(X, Y, FitConfig(kernel="rbf", gamma=0.3, C=5.0))
    path = save_experiment(tmp_path / "e.json", gauges(), result)
    assert load_experiment(path).results["model"]["coefficients"] == \
        result.model.coefficients.tolist()


def test_dict_form_round_trips_without_a_file():
    result = fit(X, Y, FitConfig())
    experiment = experiment_from_dict(experiment_to_dict(gauges(), result.config, result))
    assert experiment.dataset == gauges()


def test_a_result_of_another_configuration_is_refused():
    result = fit(X, Y, FitConfig(C=1.0))
    with pytest.raises(InputError, match="different configuration"):
        experiment_to_dict(gauges(), FitConfig(C=2.0), result)


def test_the_checksum_covers_the_canonical_content(saved):
    path, _ = saved
    document = json.loads(path.read_text(encoding="utf-8"))
    assert document["checksum"]["value"] == content_checksum(document)


def test_a_one_byte_edit_is_caught_by_the_checksum(saved):
    path, result = saved
    text = path.read_text(encoding="utf-8")
    old = repr(float(result.b))
    digit = old[-2]
    edited = old[:-2] + ("1" if digit != "1" else "2") + old[-1]
    path.write_text(text.replace(f'"b": {old}', f'"b": {edited}', 1), encoding="utf-8")
    with pytest.raises(FileFormatError) as caught:
        load_experiment(path)
    assert any(p.startswith("/checksum/value: the content does not match")
               for p in caught.value.problems)


def test_a_truncated_file_says_it_looks_cut_short(saved):
    path, _ = saved
    text = path.read_text(encoding="utf-8")
    path.write_text(text[: len(text) // 2], encoding="utf-8")
    with pytest.raises(FileFormatError, match="not valid JSON.*cut short"):
        load_experiment(path)


def test_every_schema_problem_is_listed_with_its_json_path():
    document = experiment_to_dict(gauges(), FitConfig(), None)
    document["points"][4]["label"] = None
    document["points"][1]["x"] = [1.0]
    document["config"]["kernel"] = "sigmoid"
    del document["data"]["label_name"]
    with pytest.raises(FileFormatError, match="4 problems") as caught:
        experiment_from_dict(document)
    assert caught.value.problems == [
        "/config/kernel: expected one of \"linear\", \"polynomial\", \"rbf\"; got \"sigmoid\"",
        "/data: missing the required key 'label_name'",
        "/points/1/x: expected at least 2 entries; got 1",
        "/points/4/label: expected a string or a number or true/false; got null",
    ]


def test_a_label_outside_the_mapping_is_named_with_its_path():
    document = experiment_to_dict(gauges(), FitConfig(), None)
    document["points"][2]["label"] = "maybe"
    with pytest.raises(FileFormatError) as caught:
        experiment_from_dict(document)
    assert caught.value.problems == [
        '/points/2/label: expected one of "pass", "fail" (the labels in /data/label_mapping); '
        'got "maybe"']


def test_per_point_results_must_have_one_entry_per_point():
    result = fit(X, Y, FitConfig())
    document = experiment_to_dict(gauges(), result.config, result)
    document["results"]["alpha"].pop()
    with pytest.raises(FileFormatError) as caught:
        experiment_from_dict(document)
    assert caught.value.problems == ["/results/alpha: expected 6 entries, one per point; got 5"]


def test_a_newer_format_version_asks_for_an_update():
    document = experiment_to_dict(gauges(), FitConfig(), None)
    document["version"] = 7
    with pytest.raises(FileFormatError, match="newer Slackline"):
        experiment_from_dict(document)


def test_a_json_document_of_another_kind_is_refused():
    with pytest.raises(FileFormatError, match="expected a JSON object"):
        experiment_from_dict([1, 2, 3])


def test_an_unknown_format_name_is_refused():
    with pytest.raises(FileFormatError, match="not a Slackline experiment"):
        experiment_from_dict({"format": "spreadsheet", "version": 1})


def test_the_schema_itself_is_valid_draft_2020_12():
    from jsonschema import Draft202012Validator

    from solver.files.schema_check import experiment_schema
    Draft202012Validator.check_schema(experiment_schema())


def test_the_schema_names_every_fit_setting():
    from solver.files.schema_check import experiment_schema
    config = experiment_schema()["properties"]["config"]["properties"]
    assert set(config) == set(FitConfig().to_dict())


def test_a_bad_point_deep_in_a_long_list_is_still_found():
    many = Dataset.from_points(np.repeat(X, 10, axis=0), np.repeat(Y, 10))
    document = experiment_to_dict(many, FitConfig(), None)
    document["points"][37]["x"][1] = "0.5"
    with pytest.raises(FileFormatError) as caught:
        experiment_from_dict(document)
    assert caught.value.problems == ['/points/37/x/1: expected a number; got a string "0.5"']


def test_a_number_too_large_for_a_float_is_named_with_its_path(saved):
    path, result = saved
    text = path.read_text(encoding="utf-8")
    path.write_text(text.replace(f'"b": {float(result.b)!r}', '"b": 1e999', 1),
                    encoding="utf-8")
    with pytest.raises(FileFormatError) as caught:
        load_experiment(path)
    assert caught.value.problems == ["/results/b: expected a finite number; got inf"]


def test_a_document_with_no_points_yet_round_trips(tmp_path):
    empty = Dataset(X=np.zeros((0, 2)), y=np.zeros(0, dtype=int), labels=(),
                    feature_names=("x1", "x2"), label_name="label",
                    label_mapping={"+1": 1, "-1": -1})
    path = save_experiment(tmp_path / "e.json", empty, None, config=FitConfig())
    assert load_experiment(path).dataset == empty
