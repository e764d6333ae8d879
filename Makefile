# latdyn: `make demo` runs the main job on the demo aircraft, `make test` runs the test suite.
# Both create .venv and install latdyn into it when it is missing.
PYTHON ?= python3
VENV := .venv
BIN := $(VENV)/bin
STAMP := $(VENV)/.installed

.PHONY: demo test bench clean

$(STAMP): pyproject.toml
	test -x $(BIN)/python || $(PYTHON) -m venv $(VENV)
	$(BIN)/python -m pip install -q --upgrade pip
	$(BIN)/python -m pip install -q -e '.[test]'
	touch $(STAMP)

demo: $(STAMP)
	$(BIN)/latdyn modes aircraft/*.toml

test: $(STAMP)
	$(BIN)/python -m pytest

bench: $(STAMP)
	$(BIN)/python benchmarks/startup.py

clean:
	rm -rf $(VENV) reports/*/ .pytest_cache
