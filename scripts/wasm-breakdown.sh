#!/usr/bin/env bash
# Builds the release app's module as Trunk does (cargo, wasm-bindgen, wasm-opt -Oz) but keeps the
# function names, then prints where its bytes go (scripts/wasm-breakdown.py). The sizes are those
# of the shipped module: the names are a custom section that wasm-opt leaves aside.
#   scripts/wasm-breakdown.sh [TOP]
set -euo pipefail
cd "$(dirname "$0")/.."
source scripts/env.sh
cargo build -q --release -p tapline-app --bin tapline-app --target wasm32-unknown-unknown
out=target/breakdown
mkdir -p "$out"
wasm-bindgen --target web --keep-debug --out-dir "$out" \
  target/wasm32-unknown-unknown/release/tapline-app.wasm
wasm-opt -Oz --converge --low-memory-unused -g "$out/tapline-app_bg.wasm" -o "$out/named.wasm" \
  --enable-bulk-memory --enable-nontrapping-float-to-int --enable-sign-ext \
  --enable-mutable-globals --enable-reference-types --enable-multivalue
python3 scripts/wasm-breakdown.py "$out/named.wasm" "${1:-40}"
