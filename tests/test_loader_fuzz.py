"""Whatever the bytes, the loaders either succeed or raise a SlacklineError."""

import json
import os
import tempfile

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from solver import FitConfig, fit
from solver.files.dataset import Dataset, load_table, preview_table
from solver.errors import SlacklineError
from solver.files.experiment import experiment_from_dict, experiment_to_dict, load_experiment

# SLACKLINE_FUZZ_EXAMPLES=2000 for a longer hunt; the default keeps the suite fast
FUZZ = settings(max_examples=int(os.environ.get("SLACKLINE_FUZZ_EXAMPLES", 60)), deadline=None,
                suppress_health_check=[HealthCheck.too_slow])
FOLDER = tempfile.mkdtemp(prefix="slackline-fuzz-")


def as_file(data: bytes, name: str) -> str:
    path = os.path.join(FOLDER, name)
    with open(path, "wb") as stream:
        stream.write(data)
    return path


def load_or_refuse(loader, *args, **kwargs):
    try:
        loader(*args, **kwargs)
    except SlacklineError:
        pass


cells = st.one_of(st.integers(-10**6, 10**6).map(str),
                  st.floats(allow_nan=True, allow_infinity=True).map(repr),
                  st.sampled_from(["", "pass", "fail", "NA", "=1+1", '"q,uoted"', "1,5", " "]),
                  st.text(max_size=8))
tables = st.tuples(st.sampled_from([",", ";", "\t", "|"]),
                   st.integers(1, 5).flatmap(lambda k: st.tuples(
                       st.lists(st.text(max_size=6), min_size=k, max_size=k),
                       st.lists(st.lists(cells, min_size=k - 1, max_size=k + 1), max_size=12))))
json_values = st.recursive(
    st.none() | st.booleans() | st.integers() | st.floats(allow_nan=False) | st.text(max_size=8),
    lambda inner: st.lists(inner, max_size=4) | st.dictionaries(st.text(max_size=8), inner,
                                                                max_size=4),
    max_leaves=20)


@FUZZ
@given(st.binary(max_size=2000), st.sampled_from(["t.csv", "t.tsv", "t.txt", "t.xlsx"]))
def test_random_bytes_as_a_table(data, name):
    path = as_file(data, name)
    load_or_refuse(load_table, path)
    load_or_refuse(preview_table, path)


@FUZZ
@given(tables, st.booleans())
def test_random_csv_text(table, drop_incomplete):
    delimiter, (header, rows) = table
    lines = [delimiter.join(header)] + [delimiter.join(row) for row in rows]
    path = as_file("\n".join(lines).encode("utf-8"), "r.csv")
    load_or_refuse(load_table, path, drop_incomplete=drop_incomplete)


@FUZZ
@given(st.binary(max_size=2000))
def test_random_bytes_as_an_experiment(data):
    load_or_refuse(load_experiment, as_file(data, "e.json"))


@FUZZ
@given(json_values)
def test_random_json_as_an_experiment(document):
    load_or_refuse(experiment_from_dict, document)
    load_or_refuse(load_experiment, as_file(json.dumps(document).encode(), "e.json"))


_VALID = experiment_to_dict(
    Dataset.from_points([[0, 0], [1, 0.5], [3, 3], [4, 2.5]], [-1, -1, 1, 1]), FitConfig(),
    fit([[0, 0], [1, 0.5], [3, 3], [4, 2.5]], [-1, -1, 1, 1], FitConfig()))


def _paths(value, prefix=()):
    yield prefix
    if isinstance(value, dict):
        for key, item in value.items():
            yield from _paths(item, prefix + (key,))
    elif isinstance(value, list):
        for index, item in enumerate(value):
            yield from _paths(item, prefix + (index,))


PATHS = [p for p in _paths(_VALID) if p]


@FUZZ
@given(st.sampled_from(PATHS), json_values)
def test_a_valid_experiment_with_one_part_replaced(path, replacement):
    document = json.loads(json.dumps(_VALID))
    target = document
    for key in path[:-1]:
        target = target[key]
    target[path[-1]] = replacement
    load_or_refuse(experiment_from_dict, document)
