#!/usr/bin/env bash
# Fuzzes one target of the TaskPhrase.Fuzz harness with afl-fuzz for a bounded time.
#   tests/TaskPhrase.Fuzz/run-fuzz.sh TARGET SECONDS
# TARGET: registry | probes | safetensors | index | index-raw (see 'dotnet run --project tests/TaskPhrase.Fuzz -- list').
# Installs afl++ (Debian package) and the SharpFuzz.CommandLine dotnet tool when missing, publishes the harness,
# instruments the library assemblies (TaskPhrase.dll and the parsers it drives; never the harness), seeds the corpus
# from the repository's fixtures and runs afl-fuzz for SECONDS. Work files go to $FUZZ_WORK (default artifacts/fuzz,
# git-ignored). Prints executions, executions per second, paths and crashes at the end; exit 1 when crashes were saved.
# FUZZ_SAVE_CORPUS=1: afterwards, minimise (afl-cmin) the committed corpus plus the new queue into
# tests/TaskPhrase.Fuzz/corpus/TARGET, which replay-corpus.sh runs in CI (FUZZ_WORK must then not be under /tmp).
set -euo pipefail
if [ $# -ne 2 ]; then echo "usage: $0 TARGET SECONDS" >&2; exit 2; fi
target=$1
seconds=$2
# FUZZ_HARNESS_DIR: the harness folder, when this script runs from a copy (a long run survives edits to the original).
here=${FUZZ_HARNESS_DIR:-$(cd "$(dirname "$0")" && pwd)}
root=$(cd "$here/../.." && pwd)
work=${FUZZ_WORK:-$root/artifacts/fuzz}
sharpfuzz_version=2.3.0

if ! command -v afl-fuzz >/dev/null; then
  apt-get update -qq && apt-get install -y -qq afl++
fi
if [ ! -x "$work/tools/sharpfuzz" ]; then
  dotnet tool install --tool-path "$work/tools" SharpFuzz.CommandLine --version "$sharpfuzz_version"
fi

# A fresh publish every run: instrumenting an already instrumented assembly fails.
bin="$work/bin"
rm -rf "$bin"
dotnet publish "$here/TaskPhrase.Fuzz.csproj" -c Release -o "$bin" --nologo -v quiet
for dll in TaskPhrase.dll YamlDotNet.dll CsvHelper.dll; do
  "$work/tools/sharpfuzz" "$bin/$dll"
done

in="$work/in/$target"
out="$work/out/$target"
rm -rf "$in"
(cd "$root" && dotnet "$bin/TaskPhrase.Fuzz.dll" collect "$target" "$in")
mkdir -p "$out"

# Dictionaries (-x, up to 4): hostile UTF-8 for the text targets, format keywords for each.
dicts=()
case $target in registry|probes) [ -f "$here/dict/unicode.dict" ] && dicts+=(-x "$here/dict/unicode.dict");; esac
base=${target%-raw}
[ -f "$here/dict/$base.dict" ] && dicts+=(-x "$here/dict/$base.dict")

# -V: stop after SECONDS; -t 5000 ms per input (the .NET start-up is paid once, in the fork server, not per input).
export AFL_SKIP_BIN_CHECK=1 AFL_NO_UI=1 AFL_SKIP_CPUFREQ=1 AFL_I_DONT_CARE_ABOUT_MISSING_CRASHES=1 AFL_AUTORESUME=1
(cd "$root" && afl-fuzz -V "$seconds" "${dicts[@]}" -i "$in" -o "$out" -t 5000 -m none -- dotnet "$bin/TaskPhrase.Fuzz.dll" fuzz "$target") \
  > "$work/afl-$target.log" 2>&1 || true

stats="$out/default/fuzzer_stats"
if [ ! -f "$stats" ]; then
  echo "afl-fuzz did not start; see $work/afl-$target.log" >&2
  tail -n 30 "$work/afl-$target.log" >&2
  exit 2
fi
get() { sed -n "s/^$1 *: *//p" "$stats"; }
crashes=$(get saved_crashes)
if [ "${FUZZ_SAVE_CORPUS:-0}" = 1 ]; then
  corpus="$here/corpus/$target"
  merged="$work/merged/$target"
  rm -rf "$merged" "$work/min/$target"
  mkdir -p "$merged" "$corpus"
  cp "$out"/default/queue/id:* "$merged"/ 2>/dev/null || true
  cp "$corpus"/* "$merged"/ 2>/dev/null || true
  (cd "$root" && afl-cmin -i "$merged" -o "$work/min/$target" -m none -t 5000 -- "$(readlink -f "$(command -v dotnet)")" "$bin/TaskPhrase.Fuzz.dll" fuzz "$target") \
    > "$work/cmin-$target.log" 2>&1
  find "$corpus" -maxdepth 1 -type f -delete
  i=0
  for f in "$work/min/$target"/*; do cp "$f" "$corpus/$(printf '%04d' $i)"; i=$((i + 1)); done
  echo "corpus $target: $i minimised inputs in $corpus"
fi
echo "target $target: $(get run_time) s, $(get execs_done) executions ($(get execs_per_sec)/s), corpus $(get corpus_count), crashes $crashes, hangs $(get saved_hangs)"
if [ "${crashes:-0}" != "0" ]; then
  echo "crashing inputs: $out/default/crashes (replay: dotnet run --project tests/TaskPhrase.Fuzz -- replay $target $out/default/crashes)"
  exit 1
fi
