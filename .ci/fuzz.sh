#!/usr/bin/env bash
# Fuzzing in CI: each Go fuzz target runs in turn for a bounded time
# (FUZZTIME, default 20s) on top of its checked-in seed corpus
# (testdata/fuzz/<Target>/ beside the package). A crash, a failed property
# or a build failure fails CI; the fuzzer writes the failing input to
# testdata/fuzz/<Target>/ and this script names the target and that file.
# Reproduce with: go test -run '<Target>/<file>' <package>
set -uo pipefail
cd "$(dirname "$0")/.."
fuzztime=${FUZZTIME:-20s}
# Minimising each new interesting input may take 60s by default, which a
# target whose every execution touches files (FuzzVerifyTar) spends whole
# on its first find: bounded here so that the fuzzing time is fuzzing.
minimize=${FUZZMINIMIZETIME:-2s}
targets=(
	"FuzzParse ./stages/study"
	"FuzzConstraintFile ./stages/study"
	"FuzzCompile ./stages/expr"
	"FuzzParseSamples ./stages/compare"
	"FuzzVerifyTar ./cmd/inflatrace/internal/archive"
)
failed=()
for t in "${targets[@]}"; do
	read -r name pkg <<<"$t"
	echo "fuzz: $name in $pkg for $fuzztime"
	start=$SECONDS
	if ! go test -run XXX -fuzz "^${name}\$" -fuzztime "$fuzztime" -fuzzminimizetime "$minimize" "$pkg"; then
		echo "fuzz: FAILED $name ($pkg) after $((SECONDS - start))s" >&2
		new=$(git status --porcelain --untracked-files=all -- "${pkg#./}/testdata/fuzz/$name" | sed 's/^...//')
		[ -n "$new" ] && echo "fuzz: failing input: $new" >&2
		failed+=("$name")
	else
		echo "fuzz: ok $name ($((SECONDS - start))s)"
	fi
done
if [ ${#failed[@]} -gt 0 ]; then
	echo "fuzz: ${#failed[@]} target(s) failed: ${failed[*]}" >&2
	exit 1
fi
echo "fuzz: all ${#targets[@]} targets passed"
