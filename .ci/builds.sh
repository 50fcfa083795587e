#!/usr/bin/env bash
# .ci/builds.sh: the same numbers on every build (issue: bit-identical
# outputs). Compares, bit for bit, the output hashes of the demo, a
# reheating study (every history, a sample-based constraint, a forecast),
# an exact-method study and (amd64 only) a study of inferences between
#   - amd64 GOAMD64=v1 (the golden, testdata/golden/build-identity.txt),
#   - amd64 GOAMD64=v3, where gc fuses multiply-adds,
#   - arm64, which fuses by default, run under qemu-user (Debian's
#     qemu-user package, installed here when missing),
# and, end to end, merges a v3 binary's ledger into a v1 binary's: merge
# refuses any key whose outputs differ.
set -euo pipefail
cd "$(dirname "$0")/.."
tests='OutputsSameOnEveryBuild|SameBitsEveryBuild|RangePointsAreTheFormula|AsinNearOne'
pkgs='./stages/study ./stages/num/detmath'

echo "builds: GOAMD64=v3"
GOAMD64=v3 go test -count=1 -run "$tests" $pkgs

if ! command -v qemu-aarch64 >/dev/null; then
	export DEBIAN_FRONTEND=noninteractive
	apt-get update -qq
	apt-get install -y -qq --no-install-recommends qemu-user >/dev/null
fi
bin=$(mktemp -d)
trap 'rm -rf "$bin"' EXIT
for p in $pkgs; do
	name=$(basename "$p")
	GOARCH=arm64 CGO_ENABLED=0 go test -c -o "$bin/$name.arm64" "$p"
	# A test binary runs in its package's directory, as go test runs it.
	(cd "$p" && qemu-aarch64 "$bin/$name.arm64" -test.count=1 -test.run "$tests") | sed "s|^|builds: arm64 $name: |"
done

echo "builds: a v3 ledger merged into a v1 ledger"
GOAMD64=v1 go build -o "$bin/inflatrace-v1" ./cmd/inflatrace
GOAMD64=v3 go build -o "$bin/inflatrace-v3" ./cmd/inflatrace
for study in configs/demo.toml testdata/configs/build-reheating.toml testdata/configs/build-exact.toml; do
	"$bin/inflatrace-v1" --ledger "$bin/v1.db" run "$study" > "$bin/v1.tsv"
	"$bin/inflatrace-v3" --ledger "$bin/v3.db" run "$study" > "$bin/v3.tsv"
	cmp "$bin/v1.tsv" "$bin/v3.tsv"
done
# Inference: every recorded number, exact (csv), and the nodes merged below.
"$bin/inflatrace-v1" --ledger "$bin/v1.db" infer testdata/configs/build-infer.toml --format csv > "$bin/v1.csv"
"$bin/inflatrace-v3" --ledger "$bin/v3.db" infer testdata/configs/build-infer.toml --format csv > "$bin/v3.csv"
cmp "$bin/v1.csv" "$bin/v3.csv"
"$bin/inflatrace-v1" --ledger "$bin/v1.db" merge "$bin/v3.db"
echo "builds: outputs identical on amd64 v1, amd64 v3 and arm64"
