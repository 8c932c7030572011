# Two-command set-up: `make demo` and `make test`. Both need only python3.
PYTHON ?= python3
VENV ?= .venv
PY := $(VENV)/bin/python
STAMP := $(VENV)/.installed

.PHONY: demo test lint bench fuzz clean

$(STAMP): pyproject.toml
	test -x $(PY) || $(PYTHON) -m venv $(VENV)
	$(PY) -m pip install --quiet --upgrade pip
	$(PY) -m pip install --quiet -e '.[test]'
	touch $(STAMP)

demo: $(STAMP)
	$(PY) examples/run_demo.py

test: $(STAMP)
	$(VENV)/bin/ruff check .
	$(PY) -m pytest

# the property suite at a large random size (make test runs it small and derandomised)
fuzz: $(STAMP)
	SUPERVISOR_FUZZ_EXAMPLES=$${SUPERVISOR_FUZZ_EXAMPLES:-500} $(PY) -m pytest tests/test_properties.py tests/cli/test_checklist_fuzz.py tests/report/test_long_text.py -q

lint: $(STAMP)
	$(VENV)/bin/ruff check .

# every benchmark runs; the status is non-zero when any of them missed a target
bench: $(STAMP)
	status=0; for f in bench/bench_*.py; do $(PY) $$f || status=1; echo; done; exit $$status

clean:
	rm -rf $(VENV) build dist .pytest_cache
