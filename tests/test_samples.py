"""The demo data sets: there, described, reproducible, and each showing what it is for."""

from pathlib import Path

from solver.files.bundled import samples

import pytest

from solver import FitConfig, NotSeparableError, fit
from solver.files.dataset import load_table
from solver.files.experiment import load_experiment

SAMPLES = Path(str(samples()))  # the bundled samples, as the installed program finds them
TABLES = sorted(SAMPLES.glob("*.csv"))


def experiment_of(table):
    return load_experiment(table.with_name(table.stem + ".experiment.json"))


def test_there_are_at_least_three_sample_tables():
    assert len(TABLES) >= 3


def test_the_sample_opened_first_sorts_first():
    assert sorted(SAMPLES.glob("*.experiment.json"))[0].name == \
        "1-pilot-batch-gauges.experiment.json"


@pytest.mark.parametrize("table", TABLES, ids=[t.name for t in TABLES])
def test_every_sample_table_has_a_line_in_the_readme(table):
    assert f"`{table.name}`" in (SAMPLES / "README.md").read_text(encoding="utf-8")


@pytest.mark.parametrize("table", TABLES, ids=[t.name for t in TABLES])
def test_every_sample_experiment_holds_its_table_and_its_hash(table):
    experiment = experiment_of(table)
    positive = experiment.dataset.label_for(1)
    assert experiment.dataset == load_table(table, positive=positive)


def test_the_generator_reproduces_the_tables_byte_for_byte(tmp_path):
    import importlib.util
    spec = importlib.util.spec_from_file_location("make_samples", SAMPLES / "make_samples.py")
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    module.main(tmp_path)
    for table in TABLES:
        assert (tmp_path / table.name).read_bytes() == table.read_bytes()


def test_the_gauge_sample_is_linearly_separable():
    data = experiment_of(SAMPLES / "1-pilot-batch-gauges.csv").dataset
    # by construction of the invented data (well-separated clusters); a hard margin exists
    fit(data.X, data.y, FitConfig(hard_margin=True))


def test_the_gauge_sample_at_c_10_reports_no_slack_on_its_margin():
    # separable, and at C = 10 no alpha reaches C, so the soft-margin optimum is the hard
    # one and every xi_i is 0 (KKT, common practice); the interior point leaves
    # y f = 1 - 3.5e-9 on two support vectors, which read as sum C_i xi_i = 3.5e-8
    data = experiment_of(SAMPLES / "1-pilot-batch-gauges.csv").dataset
    result = fit(data.X, data.y, FitConfig(C=10.0))
    assert (result.alpha < 10.0).all() and (result.status != "inside").all()
    assert (result.slack == 0.0).all() and result.penalty_term == 0.0


def test_the_proofing_sample_overlaps():
    data = experiment_of(SAMPLES / "2-proofing-trials.csv").dataset
    with pytest.raises(NotSeparableError):
        fit(data.X, data.y, FitConfig(hard_margin=True, scaling="zscore"))


def test_the_spray_sample_needs_a_kernel():
    data = experiment_of(SAMPLES / "3-hollow-cone-spray.csv").dataset
    linear = fit(data.X, data.y, FitConfig(C=10.0, scaling="zscore"))
    rbf = fit(data.X, data.y, FitConfig(C=10.0, kernel="rbf", gamma=1.0, scaling="zscore"))
    # demo-suitability thresholds, common practice, no source
    assert linear.training_error > 0.3
    assert rbf.training_error < 0.05
