#!/usr/bin/env bash
# No fused multiply-add in the numerics: compiles every package under stages/
# and pipeline/ for the targets whose compilers fuse a*b+c on their own
# (amd64 at GOAMD64=v3, arm64, ppc64le, s390x, riscv64, loong64) and fails
# if the generated code holds any fused instruction. The Go specification
# lets a compiler fuse x*y+z unless the product is converted explicitly,
# float64(x*y); a fused site gives other last bits on those builds than on
# amd64 v1, so output hashes would differ between the machines of one
# cluster. Prints file:line of every fused site it finds.
set -euo pipefail
cd "$(dirname "$0")/.."
pkgs=$(go list ./stages/... ./pipeline/...)
out=$(mktemp)
trap 'rm -f "$out"' EXIT
for target in ${NOFMA_TARGETS:-amd64:v3 arm64: ppc64le: s390x: riscv64: loong64:}; do
	arch=${target%%:*}
	level=${target#*:}
	# -gcflags=-S prints the assembly of each compiled package on stderr.
	if ! GOARCH=$arch GOAMD64=${level:-v1} CGO_ENABLED=0 go build -a -gcflags='-S' $pkgs 2> "$out.asm"; then
		cat "$out.asm" >&2
		echo "nofma: build for $arch failed" >&2
		exit 1
	fi
	# Instruction lines look like "0x0012 00018 (/path/file.go:42)	VFMADD231SD	X1, X2, X3".
	grep -E '\((/[^)]*\.go:[0-9]+)\)[[:space:]]+V?F(N)?M(ADD|SUB)[A-Z0-9]*' "$out.asm" \
		| sed -E 's/.*\((\/[^)]*\.go:[0-9]+)\).*/\1/' | sed "s|$PWD/||" \
		| sed "s/^/$arch${level:+ $level}: /" >> "$out" || true
	rm -f "$out.asm"
done
if [ -s "$out" ]; then
	sort -u "$out" >&2
	echo "nofma: $(cut -d' ' -f2- "$out" | sed 's/^v3: //' | sort -u | wc -l) fused multiply-add sites in stages/ and pipeline/ (round the product with float64(...))" >&2
	exit 1
fi
echo "nofma: no fused multiply-add in stages/ and pipeline/ on ${NOFMA_TARGETS:-amd64:v3 arm64: ppc64le: s390x: riscv64: loong64:}"
