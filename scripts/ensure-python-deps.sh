#!/usr/bin/env bash
# Installs, only when missing, the Debian packages the Python notebooks and the third-party file checks use:
# pandas and matplotlib (the notebooks), jupyter-nbconvert / jupyter-core / python3-nbconvert / python3-ipykernel
# (to execute them: `jupyter nbconvert --execute`), and python3-tifffile (the OME-TIFF and tracks-table tests read our
# files with it). They install into Debian's /usr/bin/python3, which is what the notebooks' kernel and the tests run.
set -euo pipefail
bash "$(dirname "$0")/apt-install-missing.sh" python3-pandas python3-matplotlib python3-nbconvert jupyter-nbconvert jupyter-core python3-ipykernel python3-tifffile
