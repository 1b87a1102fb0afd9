# simplicial-verifier: `make run` for the main job, `make test` for the test suite.
PYTHON ?= python3
VENV   := .venv
BIN    := $(VENV)/bin
STAMP  := $(VENV)/.installed

.PHONY: install run test test-full bench clean

$(STAMP): pyproject.toml
	$(PYTHON) -m venv $(VENV)
	$(BIN)/pip install --quiet --upgrade pip
	$(BIN)/pip install --quiet -e '.[test]'
	touch $(STAMP)

install: $(STAMP)

run: $(STAMP)
	$(BIN)/verifier run claims
	$(BIN)/verifier check reports/certificates/*.json

test: $(STAMP)
	$(BIN)/python -m pytest -q -n 2 -m "not slow"

test-full: $(STAMP)
	$(BIN)/python -m pytest -q -n 2

bench: $(STAMP)
	$(BIN)/python bench/run.py

clean:
	rm -rf $(VENV) build *.egg-info
