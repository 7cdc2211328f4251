#!/usr/bin/env bash
# Builds the release app into dist/ for any static web server (no server-side code needed).
set -euo pipefail
cd "$(dirname "$0")/.."
scripts/setup.sh build
source scripts/env.sh
trunk build --release --offline
echo "Built into $(pwd)/dist/ — copy that folder to any static host."
