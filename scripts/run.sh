#!/usr/bin/env bash
# Sets up what is missing, builds the app and serves it on 127.0.0.1 (port 8080, or $PORT).
# On first start the app opens on a demo job.
set -euo pipefail
cd "$(dirname "$0")/.."
scripts/setup.sh build
source scripts/env.sh
PORT="${PORT:-8080}"
echo
echo "Tapline will be at http://127.0.0.1:${PORT}/ once built (Ctrl-C stops it)."
echo
exec trunk serve --offline --release --address 127.0.0.1 --port "${PORT}" --no-autoreload --no-error-reporting
