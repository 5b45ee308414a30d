# Two set-up commands: `make demo` and `make test`. Both create .venv on first use.
# `make test-quick` runs the quick set (tests not marked slow).
PYTHON ?= python3
VENV := .venv
BIN := $(VENV)/bin
STAMP := $(VENV)/.installed

.PHONY: demo test test-quick lint bench clean

$(STAMP): pyproject.toml
	$(PYTHON) -m venv $(VENV)
	$(BIN)/python -m pip install --quiet --upgrade pip
	$(BIN)/python -m pip install --quiet -e '.[test]'
	touch $(STAMP)

demo: $(STAMP)
	$(BIN)/cyclewright demo --out demo-out

test: $(STAMP)
	$(BIN)/python -m pytest

test-quick: $(STAMP)
	$(BIN)/python -m pytest -m "not slow"

lint: $(STAMP)
	$(BIN)/ruff check .
	$(BIN)/ruff format --check .

bench: $(STAMP)
	$(BIN)/python benchmarks/run_all.py

clean:
	rm -rf $(VENV) .pytest_cache .ruff_cache .hypothesis
