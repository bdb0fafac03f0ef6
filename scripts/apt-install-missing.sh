#!/usr/bin/env bash
# Installs the Debian packages named as arguments that are not installed yet (apt-get update only when one is missing).
# Shared by ensure-deps.sh and ensure-python-deps.sh.
set -euo pipefail
missing=()
for pkg in "$@"; do
  dpkg-query -W -f='${Status}' "$pkg" 2>/dev/null | grep -q "install ok installed" || missing+=("$pkg")
done
if [ ${#missing[@]} -gt 0 ]; then
  echo "shapenoise: installing ${missing[*]} (Debian packages)" >&2
  SUDO=""; [ "$(id -u)" -ne 0 ] && SUDO="sudo"
  $SUDO apt-get update -qq
  DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y -qq --no-install-recommends "${missing[@]}" >/dev/null
fi
