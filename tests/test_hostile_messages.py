"""Messages are one bounded line, whatever the input quotes at us, and no input makes a
command wait for ever (issue 10, class 4)."""

import os
import subprocess
import sys

import pytest

from hostile_cli import LINE_LIMIT, data_csv, refused  # noqa: F401
from solver.messages import listing, one_line, quote


def test_a_200_megabyte_line_is_not_echoed(capsys, tmp_path):
    path = tmp_path / "huge.csv"
    with open(path, "w") as stream:
        stream.write("a,b,label\n1,2,x\n5,6,y\n3," + "z" * 5_000_000 + ",y\n")   # 5 MB will do
    refused(capsys, ["fit", path, "--features", "a,b"], [path],
            r"1 row\(s\) of huge\.csv have a missing or non-numeric feature", problems=True)


def test_a_table_with_3000_text_columns_is_summed_up_not_listed(capsys, tmp_path):
    path = tmp_path / "wide.csv"
    names = [f"column_{i}" for i in range(3_000)]
    path.write_text(",".join(names) + "\n" + ",".join("word" for _ in names) + "\n")
    line = refused(capsys, ["fit", path], [path], r"among 3000 columns .* and 2995 more")
    assert len(line) <= LINE_LIMIT


def test_a_feature_name_that_is_not_a_column_is_cut_in_the_message(capsys, data_csv):
    refused(capsys, ["fit", data_csv, "--features", "x" * 5000 + ",bore_mm"], [data_csv],
            r"no feature column 'x+'\u2026 in data\.csv")


def test_a_huge_option_value_is_cut_in_argparse_message(capsys, data_csv):
    refused(capsys, ["fit", data_csv, "--C", "9" * 100_000 + "x"], [data_csv],
            r"argument --C: C must be a number; got '9+'\u2026")


def test_a_huge_positive_label_is_cut(capsys, data_csv):
    refused(capsys, ["fit", data_csv, "--positive", "p" * 10_000], [data_csv],
            r"--positive 'p+'\u2026 is not one of the labels")


def test_thousands_of_bad_rows_are_counted_not_listed(capsys, tmp_path):
    path = tmp_path / "bad.csv"
    path.write_text("a,b,label\n1,2,x\n2,3,y\n" + "oops,1,x\n" * 5000)
    from cli.main import main
    before = path.read_bytes()
    assert main(["fit", str(path), "--features", "a,b"]) == 2
    err = capsys.readouterr().err.splitlines()
    assert err[0].startswith("slackline fit: 5000 row(s)") and "and 4980 more" in err[0]
    assert len(err) <= 22 and err[-1] == "  ... and 4980 more problems"
    assert all(len(line) <= LINE_LIMIT for line in err) and path.read_bytes() == before


@pytest.mark.parametrize("command", ["fit", "check", "sweep"])
def test_a_named_pipe_as_input_is_refused_at_once_instead_of_waiting(tmp_path, command):
    pipe = tmp_path / "data.csv"
    os.mkfifo(pipe)
    run = subprocess.run([sys.executable, "-m", "cli.main", command, str(pipe)],
                         capture_output=True, text=True, timeout=60,
                         cwd=os.path.dirname(os.path.dirname(__file__)))
    assert run.returncode == 2
    assert run.stderr.strip().splitlines()[-1].endswith(
        "is not a regular file (a pipe, socket or device); save the data to a file and "
        "give its name")


def test_a_folder_as_input_is_refused(capsys, tmp_path):
    refused(capsys, ["fit", tmp_path], [], r"is a folder; give the name of a file in it")


def test_one_line_keeps_the_end_of_a_long_message_where_the_advice_is():
    text = one_line("start " + "x" * 1000 + " do this instead")
    assert len(text) <= 300 and text.startswith("start ") and text.endswith("do this instead")


def test_one_line_joins_lines():
    assert one_line("first\nsecond\r\n  third") == "first second third"


def test_quote_and_listing_bound_values_and_lists():
    assert quote("a" * 100) == repr("a" * 57) + "\u2026"
    assert listing(range(25), shown=3) == "0, 1, 2 and 22 more"
