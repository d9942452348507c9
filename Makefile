# Two commands on a fresh machine: `make demo` and `make test`.
PY ?= python3
VENV := .venv
BIN := $(VENV)/bin
STAMP := $(VENV)/.installed
SAMPLE ?= sample_homes/cold_gas_100a.yaml

.PHONY: demo test bench lint install clean

$(BIN)/python:
	$(PY) -m venv $(VENV)

$(STAMP): $(BIN)/python pyproject.toml
	$(BIN)/python -m pip install --quiet --upgrade pip
	$(BIN)/python -m pip install --quiet -e '.[dev]'
	touch $(STAMP)

install: $(STAMP)

demo: $(STAMP)
	$(BIN)/homeplan open $(SAMPLE)

test: $(STAMP)
	$(BIN)/python -m pytest -q

bench: $(STAMP)
	@for f in benchmarks/bench_*.py; do echo "== $$f"; $(BIN)/python $$f || exit 1; done

lint: $(STAMP)
	$(BIN)/ruff check .

clean:
	rm -rf $(VENV) build *.egg-info
