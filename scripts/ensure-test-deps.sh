#!/usr/bin/env bash
# The tests also render the HTML report in headless Chromium (Debian's chromium package) and read written files with
# tifffile (scripts/ensure-python-deps.sh, which also installs what the notebooks need): install them when missing.
set -euo pipefail
bash "$(dirname "$0")/ensure-deps.sh"
bash "$(dirname "$0")/ensure-python-deps.sh"
if ! dpkg-query -W -f='${Status}' chromium 2>/dev/null | grep -q "install ok installed"; then
  echo "shapenoise: installing chromium (Debian package) for the report rendering test" >&2
  SUDO=""; [ "$(id -u)" -ne 0 ] && SUDO="sudo"
  $SUDO apt-get update -qq
  DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y -qq --no-install-recommends chromium >/dev/null
fi
