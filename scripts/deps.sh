#!/usr/bin/env bash
# Installs the Debian packages Lintel needs that are missing.
# Usage: scripts/deps.sh build|test|demo|gui (each includes build; gui: for scripts/screenshots.py,
# the GUI office replaces the headless one). As root it runs apt-get; otherwise it uses sudo when present.
set -euo pipefail

build=(cmake make g++ pkg-config libeigen3-dev libfmt-dev libboost-dev libboost-test-dev libicu-dev libnlopt-dev
       "libreoffice-calc-nogui|libreoffice-calc" libreoffice-dev libreoffice-dev-common python3-uno)
test=(python3-numpy python3-pandas python3-scipy python3-statsmodels r-base-core r-cran-aer locales
      libopenblas0-pthread clang libclang-rt-14-dev)
demo=(python3-numpy python3-pandas poppler-utils fonts-dejavu-core)
gui=(libreoffice-calc xvfb imagemagick xdotool python3-numpy python3-pandas)

want=("${build[@]}")
case "${1:-build}" in
  build) ;;
  test) want+=("${test[@]}") ;;
  demo) want+=("${demo[@]}") ;;
  gui) want+=("${gui[@]}") ;;
  *) echo "usage: $0 build|test|demo|gui" >&2; exit 2 ;;
esac

# "a|b": either package will do (the GUI office replaces the headless one); a is installed.
installed() { dpkg-query -W -f='${Status}' "$1" 2>/dev/null | grep -q "install ok installed"; }
missing=()
for p in "${want[@]}"; do
  ok=false
  IFS='|' read -r -a alternatives <<< "$p"
  for a in "${alternatives[@]}"; do installed "$a" && ok=true; done
  $ok || missing+=("${alternatives[0]}")
done
[ ${#missing[@]} -eq 0 ] && exit 0

echo "Installing missing Debian packages: ${missing[*]}"
if [ "$(id -u)" -eq 0 ]; then sudo=(); elif command -v sudo >/dev/null; then sudo=(sudo); else
  echo "Not root and no sudo: install them with apt-get install ${missing[*]}" >&2; exit 1
fi
export DEBIAN_FRONTEND=noninteractive
"${sudo[@]}" apt-get update -q
"${sudo[@]}" apt-get install -y -q --no-install-recommends "${missing[@]}"
