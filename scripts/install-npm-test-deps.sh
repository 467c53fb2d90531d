#!/usr/bin/env bash
# Installs the independent NMEA 0183 parsers the helm tests run with Debian's nodejs
# (tests/helm/npm/package.json, versions pinned by its package-lock.json) into BUILD/npm.
# Usage: bash scripts/install-npm-test-deps.sh [build-dir]   (default: build)
set -euo pipefail
cd "$(dirname "$0")/.."
build="${1:-build}"
if ! command -v node >/dev/null || ! command -v npm >/dev/null; then
  echo "install-npm-test-deps: node/npm missing (Debian packages nodejs npm; scripts/install-deps.sh)" >&2
  exit 1
fi
mkdir -p "$build/npm"
cp tests/helm/npm/package.json tests/helm/npm/package-lock.json "$build/npm/"
(cd "$build/npm" && npm ci --no-audit --no-fund --ignore-scripts)
echo "install-npm-test-deps: parsers in $build/npm/node_modules"
