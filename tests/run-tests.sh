#!/usr/bin/env bash
# Runs the whole test suite once per linear-algebra provider (managed always; native when the
# system's OpenBLAS loads), in process; then the tests that run the program (trait Through=program)
# once more per provider against the program users run: the build ./ratedeck publishes (native code
# where clang is installed), started as a process for each command. Ends with one line
# "N passed, N failed[, N skipped]" summed from the real results of every run. Exit status is
# non-zero when a build or any test failed.
set -u
cd "$(dirname "$0")/.."

results=$(mktemp -d)
trap 'rm -rf "$results"' EXIT
status=0

if ! dotnet build RateDeck.sln -c Release --nologo -v quiet; then
    echo "build failed"
    echo "0 passed, 0 failed"
    exit 1
fi

providers="managed"
if ldconfig -p 2>/dev/null | grep -q 'libopenblas\.so\.0'; then
    providers="managed native"
else
    echo "note: libopenblas.so.0 not found; the native provider is not tested (apt-get install libopenblas0)"
fi

for provider in $providers; do
    echo "== test suite with RATEDECK_LINALG=$provider"
    RATEDECK_LINALG=$provider dotnet test RateDeck.sln -c Release --no-build --nologo \
        --logger "trx;LogFileName=$provider.trx" --results-directory "$results" || status=1
done

# The native program itself rather than the script in front of it (the script's own tests are in
# the suite): the fuzz test alone starts it some 12,000 times. A ReadyToRun build goes through the
# script, which starts it with dotnet.
program="$PWD/solver/RateDeck.Cli/bin/published/ratedeck"
if ./ratedeck --version >/dev/null && [ -x "$program" ]; then
    [ -f "$program.dll" ] && program="$PWD/ratedeck"
    for provider in $providers; do
        echo "== command-line tests through the published program ($program) with RATEDECK_LINALG=$provider"
        RATEDECK_TEST_PROGRAM="$program" RATEDECK_LINALG=$provider dotnet test RateDeck.sln -c Release --no-build --nologo \
            --filter "Through=program" --logger "trx;LogFileName=program-$provider.trx" --results-directory "$results" || status=1
    done
else
    echo "./ratedeck could not publish the program: the tests through it did not run"
    status=1
fi

passed=0; failed=0; skipped=0
for trx in "$results"/*.trx; do
    [ -f "$trx" ] || continue
    counters=$(grep -o '<Counters [^>]*>' "$trx" | head -n 1)
    value() { echo "$counters" | sed -n "s/.* $1=\"\([0-9]*\)\".*/\1/p"; }
    passed=$((passed + $(value passed)))
    failed=$((failed + $(value failed)))
    skipped=$((skipped + $(value notExecuted)))
done

if [ "$passed" -eq 0 ] && [ "$failed" -eq 0 ]; then
    echo "no test results were found"
    status=1
fi
echo "$passed passed, $failed failed, $skipped skipped"
exit $status
