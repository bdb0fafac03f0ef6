#!/usr/bin/env bash
# Installs, only when missing, the Debian packages the Python notebooks and the third-party file checks use:
# pandas and matplotlib (the notebooks), jupyter-nbconvert / jupyter-core / python3-nbconvert / python3-ipykernel
# (to execute them: `jupyter nbconvert --execute`), and python3-tifffile (the OME-TIFF and tracks-table tests read our
# files with it). They install into Debian's /usr/bin/python3, which is what the notebooks' kernel and the tests run.
set -euo pipefail
missing=()
for pkg in python3-pandas python3-matplotlib python3-nbconvert jupyter-nbconvert jupyter-core python3-ipykernel python3-tifffile; do
  dpkg-query -W -f='${Status}' "$pkg" 2>/dev/null | grep -q "install ok installed" || missing+=("$pkg")
done
if [ ${#missing[@]} -gt 0 ]; then
  echo "shapenoise: installing ${missing[*]} (Debian packages)" >&2
  SUDO=""; [ "$(id -u)" -ne 0 ] && SUDO="sudo"
  $SUDO apt-get update -qq
  DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y -qq --no-install-recommends "${missing[@]}" >/dev/null
fi
