"""What the guards against hostile files cost, beside the standard library on the same data.

    .venv/bin/python -m bench untrusted_bench

Reading: ``json.loads`` (the reference) against ``parse_untrusted`` (the same
parse plus the nesting scan, the integer bound and the duplicate-key hook) and
against the whole ``load_experiment`` (schema, consistency, checksum).
Writing: ``Path.write_text`` (the reference, no safety at all) against
``atomic_write_text`` (temporary file, fsync, stale-file sweep, folder lock,
stamp check, rename).  Ratios are ours / reference; timings on a shared
machine are noisy, so compare within one run.
"""

from __future__ import annotations

import json
import tempfile
from pathlib import Path

import numpy as np

from solver import FitConfig, fit
from solver.files.atomic import atomic_write_text
from solver.files.dataset import Dataset
from solver.files.experiment import load_experiment, save_experiment
from solver.files.untrusted import parse_untrusted

from bench.file_bench import _median_ms  # the same median-of-repeats timer


def main() -> None:
    rng = np.random.default_rng(5)
    with tempfile.TemporaryDirectory() as folder:
        folder = Path(folder)
        for n in (1_000, 10_000, 100_000):
            X = np.r_[rng.normal(0, 1, (n // 2, 2)), rng.normal(2, 1, (n - n // 2, 2))]
            y = np.r_[-np.ones(n // 2, int), np.ones(n - n // 2, int)]
            data = Dataset.from_points(X, y)
            path = folder / f"e{n}.json"
            save_experiment(path, data, fit(data.X, data.y, FitConfig()))
            text = path.read_text()
            plain = _median_ms(lambda: json.loads(text))
            guarded = _median_ms(lambda: parse_untrusted(text, path.name))
            whole = _median_ms(lambda: load_experiment(path), 3)
            other = folder / "w.json"
            write_plain = _median_ms(lambda: other.write_text(text))
            write_safe = _median_ms(lambda: atomic_write_text(other, text))
            print(f"n = {n:>7,} ({len(text) / 1e6:.1f} MB): json.loads {plain:7.1f} ms, "
                  f"parse_untrusted {guarded:7.1f} ms (x{guarded / plain:.2f}), "
                  f"load_experiment {whole:7.1f} ms (x{whole / plain:.2f}) | write_text "
                  f"{write_plain:6.1f} ms, atomic_write_text {write_safe:6.1f} ms "
                  f"(x{write_safe / write_plain:.2f})", flush=True)


if __name__ == "__main__":
    main()
