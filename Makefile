# latdyn: `make demo` runs the main job on the demo aircraft, `make test` runs the test suite.
# Both create .venv and install latdyn into it when it is missing; `make docs` builds the API
# reference into docs/_build/html.
PYTHON ?= python3
VENV := .venv
BIN := $(VENV)/bin
STAMP := $(VENV)/.installed

.PHONY: demo test docs bench clean

PIP := $(BIN)/python -m pip --disable-pip-version-check

$(STAMP): pyproject.toml
	test -x $(BIN)/python || $(PYTHON) -m venv $(VENV)
	$(PIP) install -q --upgrade pip
	$(PIP) install -q -e '.[test,docs]'
	touch $(STAMP)

DEMO_BASE := aircraft/kestrel-k40.toml
DEMO_VARIANTS := aircraft/kestrel-k40-tall-fin.toml aircraft/kestrel-k40-tip-tanks.toml aircraft/kestrel-k40-tip-tanks-yaw-damper.toml
DEMO_YAW_DAMPER := aircraft/kestrel-k40-tip-tanks-yaw-damper.toml
# turbulence of the demo (invented for the scenario, not taken from a document)
DEMO_GUST := --sigma-v 1.5 --scale-length 500
DEMO_FLIGHT_TEST := --data aircraft/flight-test/kestrel-k40-cruise-rudder-doublet.csv --data aircraft/flight-test/kestrel-k40-cruise-aileron-3211.csv

demo: $(STAMP)
	$(BIN)/latdyn modes aircraft/skylark-sv2.toml
	$(BIN)/latdyn assess $(DEMO_BASE) $(DEMO_VARIANTS)
	$(BIN)/latdyn sweep $(DEMO_BASE) --vary controls.aileron_deg=5:25:9 --condition approach
	$(BIN)/latdyn sweep $(DEMO_YAW_DAMPER) --vary augmentation.yaw_damper_gain=0:0.2:11 --condition cruise
	$(BIN)/latdyn turbulence $(DEMO_YAW_DAMPER) $(DEMO_GUST) --condition cruise
	$(BIN)/latdyn report $(DEMO_BASE) $(addprefix --compare ,$(DEMO_VARIANTS)) -o reports/demo --force --progress $(DEMO_GUST)
	$(BIN)/latdyn identify $(DEMO_BASE) --condition cruise $(DEMO_FLIGHT_TEST) --report reports/flight-test --force

test: $(STAMP)
	$(BIN)/python -m pytest

# warnings are errors; tests/test_docs.py runs the same build, so make test (and CI) builds the docs
docs: $(STAMP)
	$(BIN)/python -m sphinx -W --keep-going -q -b html -d docs/_build/doctrees docs docs/_build/html

bench: $(STAMP)
	$(BIN)/python benchmarks/startup.py
	$(BIN)/python benchmarks/engine.py
	$(BIN)/python benchmarks/responses.py
	$(BIN)/python benchmarks/studies.py

clean:
	rm -rf $(VENV) reports/*/ .pytest_cache docs/_build docs/api docs/glossary.rst
