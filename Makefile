# Each target does its own set-up: a virtual environment in .venv with the
# package installed (editable) and what the target needs: the core for the demo,
# every extra and the test tools for the tests and benchmarks.
PYTHON ?= python3
VENV   := .venv
BIN    := $(VENV)/bin
CORE   := $(VENV)/.core
STAMP  := $(VENV)/.installed

.PHONY: demo test bench clean

$(CORE): pyproject.toml
	$(PYTHON) -m venv $(VENV)
	$(BIN)/python -m pip install --quiet --upgrade pip
	$(BIN)/python -m pip install --quiet -e .
	touch $(CORE)

$(STAMP): $(CORE)
	$(BIN)/python -m pip install --quiet -e '.[test]'
	touch $(STAMP)

## demo: audit the demo models (a held frame, then one with a sway mechanism), then forces,
## then the hall roof's chords: restraint lengths, the chords compressed by uplift, restraint forces
demo: $(CORE)
	$(BIN)/spaceframe audit models/plant_platform.toml
	$(BIN)/spaceframe audit models/canopy_sway.toml; test $$? -eq 1
	$(BIN)/spaceframe forces models/hall_truss.toml
	$(BIN)/spaceframe forces models/canopy_sway.toml; test $$? -eq 1
	$(BIN)/spaceframe restraints models/hall_roof_braced.toml --chords role=chord --case uplift --fraction 0.025
	$(BIN)/spaceframe restraints models/hall_roof_unbraced.toml --chords role=chord; test $$? -eq 1

## test: run the test suite
test: $(STAMP)
	$(BIN)/python -m pytest -q

## bench: the speed and memory benchmark (prints a table; minutes, not seconds)
bench: $(STAMP)
	$(BIN)/python benchmarks/bench_audit.py

clean:
	rm -rf $(VENV) build *.egg-info spaceframe.egg-info
