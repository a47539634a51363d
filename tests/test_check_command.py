"""`slackline check` and `slackline export` run headless on experiment files."""

import json
import shutil
from pathlib import Path

from solver.files.bundled import samples

import pytest

from cli.main import main
from solver.files.experiment import content_checksum

SAMPLES = Path(str(samples()))  # the bundled samples, as the installed program finds them
EXPERIMENTS = sorted(SAMPLES.glob("*.experiment.json"))


def rewrite(path, change):
    """Edit a document and re-seal its checksum: still a valid file, other numbers."""
    document = json.loads(path.read_text(encoding="utf-8"))
    change(document)
    document["checksum"]["value"] = content_checksum(document)
    path.write_text(json.dumps(document), encoding="utf-8")


@pytest.fixture
def copy(tmp_path):
    target = tmp_path / "gauges.experiment.json"
    shutil.copy(SAMPLES / "1-pilot-batch-gauges.experiment.json", target)
    return target


@pytest.mark.parametrize("path", EXPERIMENTS, ids=[p.name for p in EXPERIMENTS])
def test_every_sample_experiment_passes_check(path, capsys):
    assert main(["check", str(path)]) == 0
    assert "agrees with the stored results" in capsys.readouterr().out


def test_a_stored_decision_value_that_moved_is_reported_as_drift(copy, capsys):
    def nudge(document):
        document["results"]["decision"][3] += 1e-3
    rewrite(copy, nudge)
    assert main(["check", str(copy)]) == 1
    assert "DRIFT in decision" in capsys.readouterr().out


def test_a_changed_status_is_reported_with_the_point(copy, capsys):
    def relabel(document):
        status = document["results"]["status"]
        status[0] = "inside" if status[0] != "inside" else "outside"
    rewrite(copy, relabel)
    assert main(["check", str(copy)]) == 1
    assert "point 0:" in capsys.readouterr().out


def test_a_damaged_file_exits_2_and_names_the_checksum(copy, capsys):
    text = copy.read_text(encoding="utf-8")
    copy.write_text(text.replace('"C": 10.0', '"C": 11.0', 1), encoding="utf-8")
    assert main(["check", str(copy)]) == 2
    assert "/checksum/value" in capsys.readouterr().err


def test_an_experiment_without_results_has_nothing_to_compare(copy, capsys):
    rewrite(copy, lambda document: document.update(results=None))
    assert main(["check", str(copy)]) == 1
    assert "no stored results" in capsys.readouterr().err


def test_check_json_prints_one_object_with_every_comparison(copy, capsys):
    assert main(["check", str(copy), "--json"]) == 0
    report = json.loads(capsys.readouterr().out)
    assert report["agrees"] is True
    assert {c["quantity"] for c in report["comparisons"]} >= {"w", "b", "alpha", "status"}


def test_export_writes_the_points_table_and_the_classifier(copy, tmp_path):
    points, card = tmp_path / "points.csv", tmp_path / "card.json"
    assert main(["export", str(copy), "--points", str(points), "--classifier", str(card)]) == 0
    assert points.read_text(encoding="utf-8").startswith("point,line,bore deviation [um]")
    assert json.loads(card.read_text(encoding="utf-8"))["classes"]["positive"] == "pass"


def test_export_without_a_target_says_what_to_ask_for(copy, capsys):
    assert main(["export", str(copy)]) == 2
    assert "--points OUT.csv, --classifier OUT.json" in capsys.readouterr().err


def test_export_of_an_unfitted_experiment_fits_it_first(copy, tmp_path, capsys):
    rewrite(copy, lambda document: document.update(results=None))
    assert main(["export", str(copy), "--classifier", str(tmp_path / "card.json")]) == 0
    assert "fitting it with its stored configuration" in capsys.readouterr().err


def test_fit_save_writes_an_experiment_that_check_passes(tmp_path, capsys):
    target = tmp_path / "trials.experiment.json"
    assert main(["fit", str(SAMPLES / "2-proofing-trials.csv"), "--positive", "rose",
                 "--C", "0.5", "--scale", "zscore", "--save", str(target)]) == 0
    assert main(["check", str(target)]) == 0


def test_check_mentions_software_that_changed_since_the_file_was_written(copy, capsys):
    def older(document):
        document["written"]["numpy"] = "1.0.0"
    rewrite(copy, older)
    assert main(["check", str(copy)]) == 0
    assert "numpy 1.0.0, now" in capsys.readouterr().out
