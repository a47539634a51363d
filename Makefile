# Slackline: `make run` opens the workbench, `make test` runs the suite headless,
# `make bench` measures the speed targets.  Each target sets up .venv first.
PYTHON ?= python3
VENV   := .venv
PY     := $(VENV)/bin/python
STAMP  := $(VENV)/.installed

.PHONY: run test bench clean

$(STAMP): pyproject.toml constraints.txt
	$(PYTHON) -m venv $(VENV)
	$(PY) -m pip install --quiet --upgrade pip
	$(PY) -m pip install --quiet -c constraints.txt -e '.[test]'
# compile the kernel solver's steps once now (seconds), so that the first Gaussian fit in
# the window does not wait for them
	$(PY) -m solver.warm_up
	touch $(STAMP)

run: $(STAMP)
	$(VENV)/bin/slackline

test: $(STAMP)
	QT_QPA_PLATFORM=offscreen $(PY) -m pytest -q

bench: $(STAMP)
	QT_QPA_PLATFORM=offscreen $(PY) -m bench

clean:
	rm -rf $(VENV) build *.egg-info .pytest_cache
