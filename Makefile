# simplicial-verifier: `make run` for the main job, `make test` for the test suite.
PYTHON ?= python3
VENV   := .venv
BIN    := $(VENV)/bin
STAMP  := $(VENV)/.installed

.PHONY: install run examples system-deps test test-full bench clean

$(STAMP): pyproject.toml
	$(PYTHON) -m venv $(VENV)
	$(BIN)/pip install --quiet --upgrade pip
	$(BIN)/pip install --quiet -e '.[test]'
	touch $(STAMP)

install: $(STAMP)

run: $(STAMP)
	$(BIN)/verifier run claims
	$(BIN)/verifier check reports/certificates/*.json
	$(MAKE) --no-print-directory examples

# The example gallery (committed): the report of the latest run in the default store.
examples: $(STAMP)
	$(BIN)/verifier report --out reports/examples --latex reports/examples/report.tex

# Debian packages the report tests need: headless Chromium renders report.html, pdflatex
# (with TikZ) compiles the LaTeX export.  Installed only when one of them is missing.
SYSTEM_PACKAGES := chromium chromium-driver texlive-latex-base texlive-pictures
SUDO := $(shell [ "$$(id -u)" = 0 ] || echo sudo)

system-deps:
	@if command -v chromium >/dev/null 2>&1 && command -v chromedriver >/dev/null 2>&1 \
	    && command -v pdflatex >/dev/null 2>&1 && kpsewhich tikz.sty >/dev/null 2>&1; then \
	  echo "system packages present: chromium, chromedriver, pdflatex with TikZ"; \
	else \
	  $(SUDO) apt-get update && \
	  DEBIAN_FRONTEND=noninteractive $(SUDO) apt-get install -y $(SYSTEM_PACKAGES); \
	fi

test: $(STAMP) system-deps
	$(BIN)/python -m pytest -q -n 2 -m "not slow"

test-full: $(STAMP) system-deps
	$(BIN)/python -m pytest -q -n 2

bench: $(STAMP)
	$(BIN)/python bench/run.py

clean:
	rm -rf $(VENV) build *.egg-info
