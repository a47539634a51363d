"""Benchmarks for the speed targets in DEVELOPERS.md; run with `make bench`."""
