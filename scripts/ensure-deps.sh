#!/usr/bin/env bash
# Installs what ShapeNoise needs on a fresh Debian machine, only when missing:
# - libgtk-3-0: OpenCvSharp's native library (libOpenCvSharpExtern.so) links against GTK 3.
# - libfontconfig1: ScottPlot draws text through SkiaSharp, which reads fonts via fontconfig.
set -euo pipefail
bash "$(dirname "$0")/apt-install-missing.sh" libgtk-3-0 libfontconfig1 fonts-dejavu-core
command -v dotnet >/dev/null || { echo "shapenoise: the .NET 10 SDK (dotnet) is required" >&2; exit 1; }
