# Each target sets itself up: a fresh clone needs only Python 3.11 and make.
PYTHON ?= python3
VENV   := .venv
BIN    := $(VENV)/bin
STAMP  := $(VENV)/.installed

.PHONY: demo test bench clean

$(STAMP): pyproject.toml
	test -d $(VENV) || $(PYTHON) -m venv $(VENV)
	$(BIN)/pip install --quiet --upgrade pip
	$(BIN)/pip install --quiet -e '.[test]'
	touch $(STAMP)

demo: $(STAMP)
	$(BIN)/ledlint check fixtures/demo/dust_extractor_panel.edif --bom fixtures/demo/bom.csv --verbose || test $$? -eq 1

test: $(STAMP)
	@# the browser test needs Debian's chromium: install it when root and it is missing
	if [ "$$(id -u)" = 0 ] && ! command -v chromium >/dev/null; then \
	    DEBIAN_FRONTEND=noninteractive apt-get install -y -qq chromium >/dev/null || \
	    { apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq chromium >/dev/null; }; fi
	$(BIN)/python -m pytest -q -p no:cacheprovider

bench: $(STAMP)
	$(BIN)/python bench/run.py $(BENCH_ARGS)

clean:
	rm -rf $(VENV) build *.egg-info
