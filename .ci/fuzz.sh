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
# deadline_race LOG: the run's only failure is the coordinator's own
# "context deadline exceeded" (no panic, no failed property).
deadline_race() {
	grep -q '^    context deadline exceeded$' "$1" &&
		! grep -qE 'panic:|Failing input|fuzz_test.go:[0-9]+:|_test.go:[0-9]+:' "$1"
}
for t in "${targets[@]}"; do
	read -r name pkg <<<"$t"
	echo "fuzz: $name in $pkg for $fuzztime"
	start=$SECONDS
	log=$(mktemp)
	go test -run XXX -fuzz "^${name}\$" -fuzztime "$fuzztime" -fuzzminimizetime "$minimize" "$pkg" 2>&1 | tee "$log"
	rc=${PIPESTATUS[0]}
	new=$(git status --porcelain --untracked-files=all -- "${pkg#./}/testdata/fuzz/$name" | sed 's/^...//')
	if [ "$rc" -ne 0 ] && [ -z "$new" ] && deadline_race "$log"; then
		# Go before 1.27 can report the end of a duration-bounded run as a
		# failure, "context deadline exceeded", with no failing input
		# (golang/go#75804: the coordinator's stop races the cancellation
		# of its workers). A count-bounded run has no deadline to race, so
		# the target runs again for a quarter of the executions it reached.
		execs=$(grep -o 'execs: [0-9]*' "$log" | tail -1 | grep -o '[0-9]*')
		count=$(( ${execs:-400} / 4 ))
		[ "$count" -lt 100 ] && count=100
		echo "fuzz: $name ended by the fuzzing coordinator's deadline race, no failing input written; again for ${count} executions"
		go test -run XXX -fuzz "^${name}\$" -fuzztime "${count}x" -fuzzminimizetime "$minimize" "$pkg" 2>&1 | tee "$log"
		rc=${PIPESTATUS[0]}
		new=$(git status --porcelain --untracked-files=all -- "${pkg#./}/testdata/fuzz/$name" | sed 's/^...//')
	fi
	rm -f "$log"
	if [ "$rc" -ne 0 ]; then
		echo "fuzz: FAILED $name ($pkg) after $((SECONDS - start))s" >&2
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
