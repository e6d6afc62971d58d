# Two commands do everything on a fresh Debian-like machine:
#   make demo   set up, then survey the embedded demo board
#   make test   set up (with the browser the report test uses), then run all tests
VENV   := .venv
PYTHON := $(VENV)/bin/python

.PHONY: demo test setup setup-test clean

demo: setup
	$(VENV)/bin/incircuit demo

test: setup-test
	$(PYTHON) -m pytest -q tests incircuit

setup:
	@sh scripts/setup.sh

setup-test:
	@sh scripts/setup.sh --test

clean:
	rm -rf $(VENV) incircuit-demo
