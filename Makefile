# The two entry points named in the README. Both do all set-up first.
.PHONY: setup demo test bench build clean

setup:
	@bash scripts/setup.sh

build: setup

demo: setup
	node dist/cli/main.js demo --out reports/demo

test: setup
	npx vitest run

bench: setup
	node dist/bench/run.js

clean:
	rm -rf dist
