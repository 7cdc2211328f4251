#!/usr/bin/env bash
# Installs what Tapline needs, skipping whatever is already present at the right version.
# Registries only: the Rust crate registry, npm and Debian packages. Nothing is downloaded from
# any other site, and Trunk later runs with --offline.
#
#   scripts/setup.sh build   tools to build the app (wasm32 target, Trunk, wasm-bindgen, wasm-opt)
#   scripts/setup.sh test    the above plus Chromium, ChromeDriver, ngspice and brotli
set -euo pipefail
cd "$(dirname "$0")/.."

want="${1:-build}"
TRUNK_VERSION="0.22.1"
CARGO_FUZZ_VERSION="0.13.2"
say() { printf '\033[1m[setup]\033[0m %s\n' "$*"; }

as_root() {
  if [ "$(id -u)" -eq 0 ]; then "$@"; elif command -v sudo >/dev/null; then sudo "$@"; else
    echo "setup: need root for: $*" >&2; exit 1; fi
}

apt_ensure() {
  local missing=()
  for p in "$@"; do dpkg -s "$p" >/dev/null 2>&1 || missing+=("$p"); done
  if [ "${#missing[@]}" -gt 0 ]; then
    say "installing Debian packages: ${missing[*]}"
    as_root apt-get update -qq
    as_root env DEBIAN_FRONTEND=noninteractive apt-get install -y -qq "${missing[@]}" >/dev/null
  fi
}

command -v cargo >/dev/null || { echo "setup: Rust (cargo, via rustup) is required" >&2; exit 1; }
command -v node >/dev/null && command -v npm >/dev/null || apt_ensure nodejs npm

if ! rustup target list --installed | grep -qx wasm32-unknown-unknown; then
  say "adding the wasm32-unknown-unknown target"
  rustup target add wasm32-unknown-unknown
fi

# Trunk 0.22 declares a newer rustc than it needs; --ignore-rust-version lets it build on this one.
if [ "$(trunk --version 2>/dev/null)" != "trunk ${TRUNK_VERSION}" ]; then
  say "installing Trunk ${TRUNK_VERSION} (several minutes on 2 cores)"
  cargo install --locked trunk --version "${TRUNK_VERSION}" --ignore-rust-version
fi

# The wasm-bindgen command-line tool must match the library version in Cargo.lock exactly. Its own
# lock file pins a crate the registry no longer has, so it is installed without --locked.
WB_VERSION="$(awk '/^name = "wasm-bindgen"$/ { getline; gsub(/version = |"/, ""); print; exit }' Cargo.lock)"
if [ "$(wasm-bindgen --version 2>/dev/null)" != "wasm-bindgen ${WB_VERSION}" ]; then
  say "installing wasm-bindgen-cli ${WB_VERSION}"
  cargo install wasm-bindgen-cli --version "${WB_VERSION}"
fi

# wasm-opt (binaryen) and playwright-core come from npm, pinned in package-lock.json.
if [ ! -f node_modules/.package-lock.json ] || [ package-lock.json -nt node_modules/.package-lock.json ]; then
  say "installing npm tools (binaryen, playwright-core)"
  npm ci --no-audit --no-fund --loglevel=error
fi

if [ "$want" = "test" ]; then
  apt_ensure chromium chromium-driver ngspice brotli
  # OpenDSS (dss-python from PyPI, pinned) in a project-local virtual environment.
  command -v python3 >/dev/null || apt_ensure python3 python3-venv
  say "OpenDSS cross-check environment (tests/opendss/.venv)"
  tests/opendss/run.sh --setup-only
  # cargo-fuzz for the short fuzz run, when the nightly toolchain is on the machine.
  if rustup toolchain list | grep -q '^nightly'; then
    if [ "$(cargo fuzz --version 2>/dev/null | awk '{print $2}')" != "${CARGO_FUZZ_VERSION}" ]; then
      say "installing cargo-fuzz ${CARGO_FUZZ_VERSION}"
      cargo install --locked cargo-fuzz --version "${CARGO_FUZZ_VERSION}"
    fi
  fi
fi

say "fetching crates"
cargo fetch --locked >/dev/null
say "ready"
