#!/usr/bin/env bash
# Renders the app icons (192, 512 and maskable 512 PNGs) from icons/shearfield.svg.
# The PNGs are committed, so builds never need this; run it after changing the SVG.
# Needs rsvg-convert (Debian: apt-get install -y librsvg2-bin).
set -euo pipefail
cd "$(dirname "$0")/../icons"
if ! command -v rsvg-convert >/dev/null; then
  echo "rsvg-convert is missing; install it with: apt-get install -y librsvg2-bin" >&2
  exit 1
fi
# One drawing serves both purposes: its mark sits inside the maskable safe zone.
rsvg-convert -w 192 -h 192 shearfield.svg -o icon-192.png
rsvg-convert -w 512 -h 512 shearfield.svg -o icon-512.png
rsvg-convert -w 512 -h 512 shearfield.svg -o icon-512-maskable.png
echo "rendered icons/icon-192.png, icons/icon-512.png, icons/icon-512-maskable.png"
