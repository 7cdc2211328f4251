# Sourced by the other scripts: puts the project's npm tools (wasm-opt) and cargo's binaries on PATH.
export PATH="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)/node_modules/.bin:${CARGO_HOME:-$HOME/.cargo}/bin:$PATH"
