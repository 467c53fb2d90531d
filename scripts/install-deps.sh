#!/usr/bin/env bash
# Installs every Debian 12 package swathguard needs to build, test and run (as root).
# Skips apt-get entirely when everything is already installed.
set -euo pipefail
pkgs=(
  build-essential cmake ninja-build pkg-config git ccache
  libboost-dev libboost-system-dev libsqlite3-dev sqlite3
  libspdlog-dev libfmt-dev libgtest-dev libgmock-dev libbenchmark-dev
  libproj-dev proj-data proj-bin libgeographiclib-dev geographiclib-tools
  libtomlplusplus-dev libcli11-dev nlohmann-json3-dev
  libimgui-dev libstb-dev libglfw3-dev libgl-dev libgl1-mesa-dev libgl1-mesa-dri libglx-mesa0
  mesa-utils xvfb xauth x11-apps imagemagick
  socat libgeos-dev gdal-bin libxml2-utils poppler-utils libcairo2-dev libgdal-dev fonts-dejavu-core
  clang libclang-rt-14-dev
  gpsd-clients libxxhash-dev
  nodejs python3-nmea2
)
missing=()
for p in "${pkgs[@]}"; do
  dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing+=("$p")
done
# npm (the helm tests' independent NMEA parsers, scripts/install-npm-test-deps.sh): Debian's
# package, unless a nodejs that bundles npm is installed already.
command -v npm >/dev/null || missing+=(npm)
if ((${#missing[@]})); then
  SUDO=""
  [[ $(id -u) -ne 0 ]] && SUDO=sudo
  echo "install-deps: installing ${#missing[@]} packages: ${missing[*]}"
  $SUDO apt-get update -qq
  DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y -qq --no-install-recommends "${missing[@]}"
else
  echo "install-deps: all packages present"
fi
