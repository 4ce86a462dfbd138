# Two commands for a fresh machine:
#   make demo   create .venv, install calcdoc with its test extras, build the demo package
#   make test   the same set-up, then the whole test suite
# System packages the PDF path and the tests need are installed with apt-get when missing
# (as root), or the build stops and names them.

PYTHON ?= python3
VENV := .venv
PY := $(VENV)/bin/python
DEMO := projects/cold-store
SYSTEM_PACKAGES := libpango-1.0-0 libpangoft2-1.0-0 fonts-dejavu-core poppler-utils chromium chromium-driver

.PHONY: demo test bench fuzz docs system compiled clean

demo: system $(VENV)/.installed compiled
	$(VENV)/bin/calcdoc build $(DEMO) --out build/cold-store

test: system $(VENV)/.installed compiled
	$(PY) -m pytest

# The fuzz tests of the suite with many more examples, random each run (about 5 minutes).
fuzz: system $(VENV)/.installed
	CALCDOC_FUZZ_SCALE=$${CALCDOC_FUZZ_SCALE:-10} $(PY) -m pytest -q -p no:randomly tests/test_fuzz.py

# docs/format.md from the program's declarations (a test checks it is current)
docs: $(VENV)/.installed
	$(PY) -m calcdoc.reference docs/format.md

bench: system $(VENV)/.installed compiled
	$(PY) bench/bench_build.py --sizes 50,100,200 --full-sizes 18,36
	$(PY) bench/bench_transient.py
	$(PY) bench/bench_bridge.py

# calcdoc's modules compiled to bytecode once (only those changed since): an editable install
# is not compiled by pip, and where PYTHONDONTWRITEBYTECODE is set (as on our CI machines)
# Python would compile all of calcdoc again on every run, about 1.5 s of each command
compiled: $(VENV)/.installed
	@$(PY) -m compileall -q calcdoc

system:
	@missing=""; \
	for p in $(SYSTEM_PACKAGES); do dpkg -s $$p >/dev/null 2>&1 || missing="$$missing $$p"; done; \
	if [ -n "$$missing" ]; then \
	  if [ "$$(id -u)" = 0 ] && command -v apt-get >/dev/null 2>&1; then \
	    echo "installing system packages:$$missing"; \
	    apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq $$missing >/dev/null; \
	  else \
	    echo "missing system packages:$$missing"; \
	    echo "install them with: sudo apt-get install$$missing"; exit 1; \
	  fi; \
	fi

$(VENV)/.installed: pyproject.toml
	$(PYTHON) -m venv $(VENV)
	$(PY) -m pip install -q --upgrade pip
	$(PY) -m pip install -q -e '.[test]'
	touch $@

clean:
	rm -rf build $(VENV)
