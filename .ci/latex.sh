#!/usr/bin/env bash
# .ci/latex.sh: a pdflatex with booktabs, siunitx and longtable, for CI's
# LaTeX test (cmd/inflatrace/latex_test.go), from Debian's texlive packages.
# Target: Debian 12, root. Installs nothing when pdflatex and the three
# packages are already there.
set -euo pipefail

have() {
  command -v pdflatex >/dev/null && command -v kpsewhich >/dev/null &&
    for sty in booktabs.sty siunitx.sty longtable.sty graphicx.sty; do
      kpsewhich "$sty" >/dev/null || return 1
    done
}

if ! have; then
  export DEBIAN_FRONTEND=noninteractive
  apt-get update -qq
  # texlive-latex-base: pdflatex, longtable (tools) and graphicx;
  # texlive-latex-recommended: booktabs; texlive-science: siunitx.
  apt-get install -y -qq --no-install-recommends \
    texlive-latex-base texlive-latex-recommended texlive-science >/dev/null
fi
have || { echo "[latex-ci] pdflatex or a package is missing after install" >&2; exit 1; }
pdflatex --version | head -1
