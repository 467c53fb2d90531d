#!/usr/bin/env bash
# Installs what is missing, builds swathguard with warnings as errors, and runs every test.
# Usage: bash scripts/test.sh        (from anywhere; builds in build-ci/)
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/install-deps.sh
cmake --preset ci
cmake --build build-ci -j"$(nproc)"
bash scripts/install-npm-test-deps.sh build-ci
ctest --test-dir build-ci --output-on-failure -j"$(nproc)"
if [[ -x scripts/fuzz-smoke.sh ]]; then bash scripts/fuzz-smoke.sh; fi
