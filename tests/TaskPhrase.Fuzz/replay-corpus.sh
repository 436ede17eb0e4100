#!/usr/bin/env bash
# Bounded CI check: replays every fuzz target's seeds (the repository's fixtures) and its committed corpus
# (tests/TaskPhrase.Fuzz/corpus/TARGET: inputs found by afl-fuzz, crash regressions included) through the harness's
# target functions in-process. No AFL, no instrumentation; a few seconds. Exit 1 when any input crashes a target.
set -euo pipefail
root=$(cd "$(dirname "$0")/../.." && pwd)
cd "$root"
dotnet run -c Release --project tests/TaskPhrase.Fuzz -- replay all
