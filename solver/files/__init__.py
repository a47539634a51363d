"""The file layer: tables in, experiments in and out, exports, atomic writes.

The window and the command line import from here, not from the modules.
"""

from solver.files import bundled
from solver.files.bundled import resource, resource_json
from solver.files.atomic import atomic_open, atomic_write_text
from solver.files.dataset import Dataset, load_table, sign_mapping, split_unit
from solver.files.experiment import (FORMAT_VERSION, Experiment, content_checksum,
                                     experiment_from_dict, experiment_to_dict, json_text,
                                     load_experiment, provenance, save_experiment)
from solver.files.classifier import classifier_document, write_classifier
from solver.files.exports import neutralise, points_table, write_points_csv
from solver.files.heldout_points import HeldOutPoints, heldout_from_section, heldout_section
from solver.files.new_rows import NewRows, read_new_rows
from solver.files.scored_table import scored_csv, scored_table, write_scored_csv
from solver.files.tables import (EXCEL_SUFFIXES, TAB_SUFFIXES, TABLE_FILTER, TABLE_SUFFIXES,
                                 TablePreview, column_values, preview_table, read_table)

__all__ = [
    "bundled", "resource", "resource_json", "atomic_open", "atomic_write_text", "Dataset", "load_table", "sign_mapping",
    "split_unit", "FORMAT_VERSION", "Experiment", "content_checksum", "experiment_from_dict",
    "experiment_to_dict", "json_text", "load_experiment", "provenance",
    "save_experiment", "classifier_document", "write_classifier", "points_table",
    "write_points_csv", "neutralise", "HeldOutPoints", "heldout_from_section",
    "heldout_section", "NewRows", "read_new_rows", "scored_csv", "scored_table",
    "write_scored_csv",
    "EXCEL_SUFFIXES", "TAB_SUFFIXES", "TABLE_FILTER", "TABLE_SUFFIXES", "TablePreview",
    "column_values", "preview_table", "read_table",
]
