"""Reading labelled points from CSV / TSV / xlsx tables, and every way that can fail."""

import numpy as np
import pytest

from solver.files.dataset import Dataset, load_table, preview_table, sign_mapping, split_unit
from solver.errors import FileFormatError, InputError


def write(tmp_path, name, text):
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


GAUGES = "bore [um],roughness [um],inspection\n2.5,0.51,pass\n11.0,1.30,fail\n1.2,0.62,pass\n"


def test_csv_with_header_gives_points_labels_and_mapping(tmp_path):
    data = load_table(write(tmp_path, "g.csv", GAUGES), positive="pass")
    # expected values: the three rows written above, read back
    assert data.X.tolist() == [[2.5, 0.51], [11.0, 1.30], [1.2, 0.62]]
    assert data.labels == ("pass", "fail", "pass")
    assert data.y.tolist() == [1, -1, 1]
    assert data.label_mapping == {"pass": 1, "fail": -1}


def test_header_units_in_brackets_become_feature_units(tmp_path):
    data = load_table(write(tmp_path, "g.csv", GAUGES), positive="pass")
    assert data.feature_names == ("bore", "roughness")
    assert data.units == ("um", "um")


def test_split_unit_leaves_a_plain_header_alone():
    assert split_unit("width") == ("width", "")


def test_rows_are_source_line_numbers_with_the_header_as_line_one(tmp_path):
    data = load_table(write(tmp_path, "g.csv", GAUGES), positive="pass")
    assert data.rows == (2, 3, 4)


def test_source_name_and_sha256_of_the_file_bytes_are_kept(tmp_path):
    import hashlib
    path = write(tmp_path, "g.csv", GAUGES)
    data = load_table(path, positive="pass")
    # expected value: hashlib's SHA-256 of the same bytes
    assert data.source == "g.csv"
    assert data.sha256 == hashlib.sha256(path.read_bytes()).hexdigest()


def test_any_two_numeric_columns_can_be_features_and_any_column_the_label(tmp_path):
    text = "batch,a,b,c,operator\n7,1,2,3,ann\n8,4,5,6,bob\n"
    data = load_table(write(tmp_path, "t.csv", text), features=["c", "a"], label="operator",
                      positive="bob")
    assert data.X.tolist() == [[3.0, 1.0], [6.0, 4.0]]
    assert data.labels == ("ann", "bob")


def test_features_may_be_named_without_their_unit(tmp_path):
    data = load_table(write(tmp_path, "g.csv", GAUGES), features=["roughness", "bore"],
                      positive="pass")
    assert data.feature_names == ("roughness", "bore")


def test_numeric_labels_keep_their_type_and_zero_one_maps_one_to_plus(tmp_path):
    data = load_table(write(tmp_path, "n.csv", "a,b,ok\n1,2,0\n3,4,1\n"))
    assert data.labels == (0, 1)
    assert data.label_mapping == {0: -1, 1: 1}


def test_tsv_suffix_means_tab_separated(tmp_path):
    data = load_table(write(tmp_path, "g.tsv", GAUGES.replace(",", "\t")), positive="pass")
    assert data.X.shape == (3, 2)


def test_semicolon_separated_file_is_sniffed_and_decimal_commas_read(tmp_path):
    text = "a;b;ok\n1,5;2;1\n3;4,25;-1\n"
    data = load_table(write(tmp_path, "eu.csv", text))
    assert data.X.tolist() == [[1.5, 2.0], [3.0, 4.25]]


def test_tab_separated_file_with_csv_suffix_is_sniffed(tmp_path):
    data = load_table(write(tmp_path, "g.csv", GAUGES.replace(",", "\t")), positive="pass")
    assert data.feature_names == ("bore", "roughness")


def test_blank_lines_are_ignored_but_line_numbers_stay_true(tmp_path):
    text = "a,b,ok\n1,2,1\n\n3,4,-1\n"
    data = load_table(write(tmp_path, "b.csv", text))
    assert data.rows == (2, 4)


def test_non_numeric_feature_is_reported_by_line_and_value(tmp_path):
    text = "a,b,ok\n1,2,1\n3,oops,-1\n5,6,1\n"
    with pytest.raises(FileFormatError, match=r"line 3") as caught:
        load_table(write(tmp_path, "bad.csv", text))
    assert "--drop-incomplete" in str(caught.value)
    assert caught.value.problems == ["line 3: b is 'oops', not a number"]


def test_missing_feature_and_missing_label_are_both_reported(tmp_path):
    text = "a,b,ok\n1,2,1\n,4,-1\n5,6,\n7,8,-1\n"
    with pytest.raises(FileFormatError) as caught:
        load_table(write(tmp_path, "gap.csv", text))
    assert caught.value.problems == ["line 3: a is missing", "line 4: ok is missing"]


def test_drop_incomplete_skips_the_listed_rows_and_records_them(tmp_path):
    text = "a,b,ok\n1,2,1\n3,oops,-1\n5,6,-1\n"
    data = load_table(write(tmp_path, "bad.csv", text), drop_incomplete=True)
    assert data.rows == (2, 4)
    assert data.skipped == (3,)


def test_three_distinct_labels_are_refused_with_their_counts(tmp_path):
    text = "a,b,grade\n1,2,A\n3,4,B\n5,6,C\n7,8,A\n"
    with pytest.raises(InputError, match=r"found 3: 'A' \(2 rows\), 'B' \(1 rows\), 'C'"):
        load_table(write(tmp_path, "three.csv", text))


def test_a_single_label_is_refused(tmp_path):
    with pytest.raises(InputError, match="exactly two distinct values; found 1"):
        load_table(write(tmp_path, "one.csv", "a,b,ok\n1,2,1\n3,4,1\n"))


def test_two_text_labels_without_positive_ask_for_it():
    with pytest.raises(InputError, match="--positive"):
        sign_mapping(["pass", "fail"])


def test_positive_that_is_not_a_label_says_which_labels_exist():
    with pytest.raises(InputError, match="'fail', 'pass'"):
        sign_mapping(["pass", "fail"], positive="ok")


def test_empty_file_says_it_is_empty(tmp_path):
    with pytest.raises(FileFormatError, match="is empty"):
        load_table(write(tmp_path, "empty.csv", ""))


def test_header_only_says_there_are_no_rows(tmp_path):
    with pytest.raises(FileFormatError, match="header row but no rows"):
        load_table(write(tmp_path, "head.csv", "a,b,ok\n"))


def test_binary_garbage_is_refused_as_not_a_text_table(tmp_path):
    path = tmp_path / "photo.csv"
    path.write_bytes(bytes(range(256)) * 8)
    with pytest.raises(FileFormatError, match="binary data"):
        load_table(path)


def test_a_column_with_values_but_no_name_is_refused_with_its_position(tmp_path):
    with pytest.raises(FileFormatError, match="column 2 of nameless.csv holds values but has "
                                              "no name"):
        load_table(write(tmp_path, "nameless.csv", "a,,ok\n1,2,1\n3,4,-1\n"))


def test_a_trailing_delimiter_on_every_line_is_harmless(tmp_path):
    data = load_table(write(tmp_path, "t.csv", "a,b,ok,\n1,2,1,\n3,4,-1,\n"))
    assert data.label_name == "ok"


def test_a_duplicate_column_name_is_refused(tmp_path):
    with pytest.raises(FileFormatError, match="names column 'a' twice"):
        load_table(write(tmp_path, "dup.csv", "a,a,ok\n1,2,1\n3,4,-1\n"))


def test_a_row_with_too_many_fields_is_refused_with_its_line(tmp_path):
    with pytest.raises(FileFormatError, match="line 3"):
        load_table(write(tmp_path, "ragged.csv", "a,b,ok\n1,2,1\n3,4,-1,9\n"))


def test_an_unknown_column_lists_the_columns_there_are(tmp_path):
    with pytest.raises(InputError, match=r"no feature column 'depth'.*\['a', 'b', 'ok'\]"):
        load_table(write(tmp_path, "t.csv", "a,b,ok\n1,2,1\n3,4,-1\n"), features=["a", "depth"])


def test_a_file_without_two_numeric_columns_says_so(tmp_path):
    with pytest.raises(InputError, match="needs two numeric feature columns"):
        load_table(write(tmp_path, "t.csv", "a,name,ok\n1,x,1\n3,y,-1\n"))


def test_a_missing_file_is_a_file_format_error(tmp_path):
    with pytest.raises(FileFormatError, match="cannot read"):
        load_table(tmp_path / "nowhere.csv")


def test_xlsx_workbooks_load_through_openpyxl(tmp_path):
    openpyxl = pytest.importorskip("openpyxl")
    book = openpyxl.Workbook()
    sheet = book.active
    for row in (["bore [um]", "roughness [um]", "inspection"], [2.5, 0.51, "pass"],
                [11.0, 1.3, "fail"]):
        sheet.append(row)
    book.save(tmp_path / "g.xlsx")
    data = load_table(tmp_path / "g.xlsx", positive="pass")
    assert data.X.tolist() == [[2.5, 0.51], [11.0, 1.3]]
    assert data.units == ("um", "um")


def test_thousands_of_rows_load(tmp_path):
    rng = np.random.default_rng(1)
    X = rng.normal(size=(5000, 2))
    lines = ["a,b,ok"] + [f"{x:.6f},{y:.6f},{1 if x > 0 else -1}" for x, y in X]
    data = load_table(write(tmp_path, "big.csv", "\n".join(lines) + "\n"))
    assert len(data) == 5000


def test_preview_lists_columns_first_rows_and_which_are_numeric(tmp_path):
    preview = preview_table(write(tmp_path, "g.csv", GAUGES), rows=2)
    assert preview.columns == ("bore [um]", "roughness [um]", "inspection")
    assert preview.rows == ((2.5, 0.51, "pass"), (11.0, 1.30, "fail"))
    assert preview.numeric == (True, True, False)
    assert preview.delimiter == ","


def test_dataset_from_points_uses_the_signs_as_labels_by_default():
    data = Dataset.from_points([[0, 0], [1, 1]], [-1, 1])
    assert data.labels == (-1, 1)
    assert data.label_mapping == {1: 1, -1: -1}


def test_column_values_reads_every_row_in_order_of_first_appearance(tmp_path):
    from solver.files import column_values
    path = tmp_path / "sorted.csv"
    path.write_text("a,b,grade\n" + "".join(f"{i},{i},{'ok' if i < 500 else 'scrap'}\n"
                                            for i in range(520)) + "521,1,\n")
    assert column_values(path, "grade") == ("ok", "scrap")          # the empty cell: none
    assert column_values(path, "absent") == ()
    many = tmp_path / "many.csv"
    many.write_text("a,b,lot\n" + "".join(f"{i},{i},L{i}\n" for i in range(80)))
    assert column_values(many, "lot", limit=50) == tuple(f"L{i}" for i in range(50))
