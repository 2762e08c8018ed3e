# tinfer: `make demo` and `make test` each set everything up from scratch on a fresh machine.
PYTHON ?= python3
VENV   := .venv
PY     := $(VENV)/bin/python
STAMP  := $(VENV)/.installed
FLOORS := .venv-floors
DEMO   := $(VENV)/.installed-demo
PIP    := $(PY) -m pip install -qq --disable-pip-version-check --progress-bar off
RECORDS := records
CHROMIUM := /usr/bin/chromium

.PHONY: setup setup-demo demo test lint unit floors tex-deps notebooks-check docs browser-deps lab notebooks bench readme-image clean

# `make test` needs the whole developer tool chain; `make demo` only the package with its
# display extra and a notebook runner (the "demo" extra), a much smaller environment.
setup: $(STAMP)
setup-demo: $(DEMO)

$(VENV)/bin/python:
	$(PYTHON) -m venv $(VENV)
	$(PIP) --upgrade pip

$(DEMO): pyproject.toml | $(VENV)/bin/python
	@echo "Installing tinfer with its display extra and a notebook runner into $(VENV) ..."
	$(PIP) -e ".[demo]"
	touch $(DEMO)

$(STAMP): pyproject.toml | $(VENV)/bin/python
	@echo "Installing tinfer with every developer tool into $(VENV) ..."
	$(PIP) -e ".[dev]"
	touch $(STAMP) $(DEMO)

# Debian's pdflatex, so that the LaTeX tables are compiled, not only looked at.
tex-deps:
	@if ! command -v pdflatex >/dev/null; then \
		echo "Installing Debian's texlive-latex-base for the LaTeX table check"; \
		apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq \
			--no-install-recommends texlive-latex-base >/dev/null; \
	fi

# Debian's Chromium for the browser checks (no browser download by any test tool).
browser-deps:
	@if [ ! -x $(CHROMIUM) ]; then \
		echo "Installing Debian's chromium package for the browser checks"; \
		apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq chromium >/dev/null; \
	fi

## The main job: run every demo notebook into a shareable analysis record (.ipynb + offline HTML).
demo: setup-demo
	$(PY) -m tinfer.records notebooks $(RECORDS)

lint: setup
	$(PY) -m ruff check tinfer tests benchmarks notebooks/conftest.py
	$(PY) -m ruff format --check tinfer tests benchmarks notebooks/conftest.py

unit: setup browser-deps tex-deps
	$(PY) -m pytest -q tests tinfer

# The unit tests again on the oldest declared versions (.ci/floors.txt), in their own
# environment: the browser checks and the docstring-style check need only the newest.
$(FLOORS)/.installed: .ci/floors.txt pyproject.toml
	rm -rf $(FLOORS)
	$(PYTHON) -m venv $(FLOORS)
	@echo "Installing the oldest declared versions into $(FLOORS) ..."
	$(FLOORS)/bin/python -m pip install -qq --disable-pip-version-check --progress-bar off \
		-r .ci/floors.txt pytest hypothesis mpmath
	$(FLOORS)/bin/python -m pip install -qq --disable-pip-version-check --no-deps -e .
	touch $@

floors: $(FLOORS)/.installed
	$(FLOORS)/bin/python -m pytest -q -p no:cacheprovider --disable-warnings -m "not browser" \
		--ignore=tests/browser --ignore=tests/test_docstrings.py tests tinfer

notebooks-check: setup
	$(PY) -m pytest -q --nbval --nbval-current-env -p no:randomly notebooks

docs: setup
	$(PY) -m sphinx -W --keep-going -q -b html docs docs/_build/html

test: lint unit floors notebooks-check docs
	@echo "make test: all checks passed"

## Re-execute the notebooks in place (their stored outputs are what nbval checks against).
notebooks: setup
	$(PY) -m tinfer.records notebooks notebooks --in-place

lab: setup
	$(VENV)/bin/jupyter lab notebooks

readme-image: setup browser-deps
	$(PY) docs/render_readme_card.py

bench: setup
	@for f in benchmarks/bench_*.py; do echo "== $$f"; $(PY) $$f; done

clean:
	rm -rf $(VENV) $(FLOORS) $(RECORDS) docs/_build test-output
