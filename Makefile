# The two entry points named in the README. Both do all set-up first.
.PHONY: setup demo test bench build clean

setup:
	@bash scripts/setup.sh

build: setup

demo: setup
	node dist/cli/main.js demo --out reports/demo

test: setup
	# setup has just built dist/: the test runner need not build it again.
	MESOFIELD_SKIP_BUILD=1 npx vitest run

bench: setup
	node dist/bench/run.js

clean:
	rm -rf dist
