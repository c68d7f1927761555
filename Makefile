# Two commands do everything: `make lab` and `make test`. Both build the virtual
# environment in .venv on first use (Python 3.11 or newer on PATH as python3).
PYTHON ?= python3
VENV := .venv
BIN := $(VENV)/bin
STAMP := $(VENV)/.installed
ROOT_FLAG := $(if $(filter 0,$(shell id -u)),--allow-root,)
PORT ?= 8888

.PHONY: lab test lint bench sample clean-venv git-filter

$(STAMP): pyproject.toml
	$(PYTHON) -m venv $(VENV)
	$(BIN)/python -m pip install --quiet --upgrade pip
	$(BIN)/python -m pip install --quiet -e '.[lab,test]'
	touch $(STAMP)

# Git stores the notebooks without their outputs (tools/strip_notebook_outputs.py, named in
# .gitattributes): a notebook run in JupyterLab then reads as unchanged. Set up once per clone;
# outside a git checkout there is nothing to set up.
git-filter:
	@if git rev-parse --git-dir >/dev/null 2>&1; then \
	  git config filter.strip-notebook-outputs.clean "python3 tools/strip_notebook_outputs.py"; \
	fi

lab: $(STAMP) git-filter
	$(BIN)/jupyter lab $(ROOT_FLAG) --port=$(PORT) --ServerApp.root_dir=notebooks

# pytest exits 5 when it collects no test: that is a failure here, not a pass.
test: $(STAMP)
	@$(BIN)/python -m pytest tests --doctest-modules kitchen; code=$$?; \
	  if [ $$code -eq 5 ]; then echo "make test: no tests were collected" >&2; exit 1; fi; \
	  exit $$code
	@$(BIN)/python -m pytest --nbval-lax notebooks; code=$$?; \
	  if [ $$code -eq 5 ]; then echo "make test: no notebooks were collected" >&2; exit 1; fi; \
	  exit $$code

lint: $(STAMP)
	$(BIN)/ruff check kitchen tests sample_data tools notebooks/conftest.py
	$(BIN)/ruff format --check kitchen tests sample_data tools notebooks/conftest.py

bench: $(STAMP)
	$(BIN)/python tests/benchmarks/run.py

sample: $(STAMP)
	$(BIN)/python sample_data/make_clay_liner_series.py
	$(BIN)/python sample_data/make_drainage_sand_series.py
	$(BIN)/python sample_data/make_flexible_wall_series.py
	$(BIN)/python sample_data/make_clay_liner_field_tests.py

clean-venv:
	rm -rf $(VENV)
