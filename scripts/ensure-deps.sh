#!/usr/bin/env bash
# Installs what ShapeNoise needs on a fresh Debian machine, only when missing:
# - libgtk-3-0: OpenCvSharp's native library (libOpenCvSharpExtern.so) links against GTK 3.
# - libfontconfig1: ScottPlot draws text through SkiaSharp, which reads fonts via fontconfig.
set -euo pipefail
missing=()
for pkg in libgtk-3-0 libfontconfig1 fonts-dejavu-core; do
  dpkg-query -W -f='${Status}' "$pkg" 2>/dev/null | grep -q "install ok installed" || missing+=("$pkg")
done
if [ ${#missing[@]} -gt 0 ]; then
  echo "shapenoise: installing ${missing[*]} (Debian packages)" >&2
  SUDO=""; [ "$(id -u)" -ne 0 ] && SUDO="sudo"
  $SUDO apt-get update -qq
  DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y -qq --no-install-recommends "${missing[@]}" >/dev/null
fi
command -v dotnet >/dev/null || { echo "shapenoise: the .NET 10 SDK (dotnet) is required" >&2; exit 1; }
