# mixwell: build the page and the command-line tool, serve the page, run every test.
#   make serve   build the page and serve www/ on 127.0.0.1 (port 8000 or the next free one)
#   make test    everything CI runs: tool setup, formatting, lints, Rust tests, the page build,
#                and the browser tests in headless Chromium (which compare the page's runs with
#                the command line's, so the release build of the tool comes first)
#   make bench   the benchmarks: the crate's, then the same runs in the page and natively
#   make page    only build the page into www/pkg/

.PHONY: serve page test bench

serve: page
	www/serve

page:
	tests/setup --without-browser
	www/build

test:
	tests/setup
	cargo fmt --all -- --check
	cargo clippy --workspace --all-targets -- -D warnings
# The browser bindings (crate/src/web/) compile only for wasm32, so that build is linted too.
	cargo clippy -p mixwell --lib --target wasm32-unknown-unknown -- -D warnings
	cargo test --workspace
	www/build
	cargo build --release --bin mixwell
	node tests/browser/run.mjs

bench:
	cargo bench -p mixwell
	tests/setup
	www/build
	cargo build --release --bin mixwell
	node tests/browser/bench.mjs
