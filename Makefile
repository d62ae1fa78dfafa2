# graphinv: every target sets up .venv itself, so a fresh clone needs only Python 3.11 and make.
PYTHON ?= python3.11
VENV := .venv
PY := $(VENV)/bin/python
STAMP := $(VENV)/.installed

.PHONY: setup demo test test-all lint bench figures clean

$(STAMP): pyproject.toml
	@command -v $(PYTHON) >/dev/null 2>&1 || { echo "error: $(PYTHON) not found; set PYTHON=python3.x (>= 3.11)"; exit 1; }
	@test -x $(PY) || $(PYTHON) -m venv $(VENV)
	$(PY) -m pip install --quiet --upgrade pip
	$(PY) -m pip install --quiet -e ".[test,dev,dask,parquet]"
	@# pynauty builds nauty from source (about a minute); without it networkx decides isomorphism.
	$(PY) -m pip install --quiet -e ".[nauty]" || echo "note: pynauty did not build; isomorphism falls back to networkx"
	@touch $(STAMP)

setup: $(STAMP)

demo: $(STAMP)
	$(VENV)/bin/graphinv demo --out out/demo

test: $(STAMP)
	$(PY) -m pytest -q -n 2 -m "not slow"

test-all: $(STAMP)
	$(PY) -m pytest -q -n 2

lint: $(STAMP)
	$(VENV)/bin/ruff check graphinv tests benchmarks
	$(VENV)/bin/mypy

bench: $(STAMP)
	$(PY) benchmarks/run.py

figures: $(STAMP)
	$(VENV)/bin/graphinv figures --out figures

# the identity recurrent configuration of the n x n grid wired to a sink, as a picture
IDENTITY_N ?= 100
.PHONY: figure-identity
figure-identity: $(STAMP)
	$(VENV)/bin/graphinv chips grid-identity $(IDENTITY_N) --png figures/identity_grid_$(IDENTITY_N).png

clean:
	rm -rf $(VENV) out build *.egg-info
