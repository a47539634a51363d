"""``slackline sweep``: output formats and messages at the door."""

import json

import numpy as np
import pytest

from cli.main import main


@pytest.fixture
def gauge_file(tmp_path):
    """Invented demo data: two gauge readings on a pilot batch of parts, pass / fail."""
    rng = np.random.default_rng(5)
    good = rng.normal([2.0, 1.0], 0.6, (12, 2))
    bad = rng.normal([3.2, 2.0], 0.6, (12, 2))
    lines = ["bore_mm,flatness_um,verdict"]
    lines += [f"{a:.4f},{b:.4f},pass" for a, b in good]
    lines += [f"{a:.4f},{b:.4f},fail" for a, b in bad]
    path = tmp_path / "pilot_batch.csv"
    path.write_text("\n".join(lines) + "\n")
    return str(path)


def test_json_output_is_exactly_one_object_with_one_step_per_C(gauge_file, capsys):
    code = main(["sweep", gauge_file, "--positive", "pass", "--steps", "3", "--folds", "3",
                 "--json"])
    out = capsys.readouterr().out
    data = json.loads(out)
    assert code == 0 and len(data["steps"]) == 3 and data["data"]["source"] == "pilot_batch.csv"


def test_csv_output_has_a_header_and_one_row_per_C(gauge_file, capsys):
    main(["sweep", gauge_file, "--positive", "pass", "--steps", "4", "--folds", "2", "--csv"])
    rows = capsys.readouterr().out.strip().splitlines()
    assert rows[0].startswith("C,margin_width") and len(rows) == 5


def test_the_table_names_both_ends_of_the_one_standard_error_range(gauge_file, capsys):
    main(["sweep", gauge_file, "--positive", "pass", "--steps", "3", "--folds", "3"])
    out = capsys.readouterr().out
    assert "largest C" in out and "smallest C" in out and "not a validated model" in out


def test_no_progress_bar_when_stderr_is_not_a_terminal(gauge_file, capsys):
    main(["sweep", gauge_file, "--positive", "pass", "--steps", "2", "--folds", "2", "--json"])
    err = capsys.readouterr().err
    assert "sweep:" not in err and "fit/s" not in err


def test_a_range_running_downwards_exits_2_with_a_message(gauge_file, capsys):
    code = main(["sweep", gauge_file, "--positive", "pass", "--from", "10", "--to", "1"])
    assert code == 2 and "must be smaller than 'to'" in capsys.readouterr().err


def test_more_folds_than_the_smaller_class_exits_2_naming_the_limit(gauge_file, capsys):
    code = main(["sweep", gauge_file, "--positive", "pass", "--folds", "13"])
    assert code == 2 and "use 12 folds or fewer" in capsys.readouterr().err


def test_hard_margin_is_refused_by_the_sweep(gauge_file, capsys):
    code = main(["sweep", gauge_file, "--positive", "pass", "--hard"])
    assert code == 2 and "cannot use --hard" in capsys.readouterr().err
