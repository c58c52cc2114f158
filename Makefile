# Each target sets itself up: a fresh clone needs only Python 3.11 and make.
PYTHON ?= python3
VENV   := .venv
BIN    := $(VENV)/bin
STAMP  := $(VENV)/.installed

.PHONY: demo test bench fuzz clean

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

# Byte-compile ledlint as a wheel install would (this checkout is installed editable, and
# PYTHONDONTWRITEBYTECODE may be set): the start-up measure then compares like with like,
# since numpy and networkx were compiled by pip.
bench: $(STAMP)
	$(BIN)/python -m compileall -q linter rules
	$(BIN)/python bench/run.py $(BENCH_ARGS)

# Fuzz every reader with atheris for FUZZ_SECONDS each (not part of CI); crashes are saved as
# fuzz/crash-<reader>-*. atheris comes from PyPI, installed here only.
FUZZ_SECONDS ?= 60
fuzz: $(STAMP)
	$(BIN)/pip install --quiet atheris
	fuzz/seeds.sh
	for reader in edif spice bom settings parts; do \
	  $(BIN)/python fuzz/fuzz_$$reader.py fuzz/corpus/$$reader -max_total_time=$(FUZZ_SECONDS) \
	    -timeout=20 -rss_limit_mb=4096 -artifact_prefix=fuzz/crash-$$reader- || exit 1; \
	done

clean:
	rm -rf $(VENV) build *.egg-info
