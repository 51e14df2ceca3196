#!/usr/bin/env bash
# The main job: installs missing Debian packages, builds lintel.oxt, installs it into the
# LibreOffice profile out/profile, generates the demo market (a scenario of our own, see
# demo-workbooks/README.md) and writes the demo workbook as out/demo/lintel-demo.ods and .pdf.
set -euo pipefail
cd "$(dirname "$0")/.."
scripts/deps.sh demo
scripts/build.sh
mkdir -p out/demo
/usr/bin/python3 demo-workbooks/build_demo.py --oxt build/lintel.oxt --profile out/profile \
    --out out/demo
echo "Demo written to out/demo/ (lintel-demo.ods, lintel-demo.pdf)."
echo "Open it with: soffice -env:UserInstallation=file://$PWD/out/profile out/demo/lintel-demo.ods"
