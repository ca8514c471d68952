#!/usr/bin/env bash
# Coverage-guided fuzzing of the scenario reader with AFL++ through SharpFuzz, for a bounded time. Not part of CI.
#   eng/fuzz-scenarios.sh [SECONDS]   (default 600)
# Seeds: docs/examples/scenarios. Findings: artifacts/fuzz/. Any crash is copied to tests/fuzz-findings/, where
# FuzzFindingsTests replays it on every test run (commit it together with the fix).
set -euo pipefail
cd "$(dirname "$0")/.."
seconds="${1:-600}"
root="$PWD"
work="$root/artifacts/fuzz"
mkdir -p "$work"

if ! command -v afl-fuzz > /dev/null; then
  echo "== installing AFL++ (Debian package afl++)"
  sudo_cmd=""; [ "$(id -u)" -ne 0 ] && sudo_cmd="sudo"
  $sudo_cmd apt-get update -qq && DEBIAN_FRONTEND=noninteractive $sudo_cmd apt-get install -y -qq afl++ > /dev/null
fi
dotnet tool restore > /dev/null

echo "== building and instrumenting the harness"
dotnet publish tests/ThermalSampling.Fuzz -c Release -o "$work/bin" --nologo -v quiet
# Only the assembly under test is instrumented: the CLI assembly that holds the scenario reader.
dotnet tool run sharpfuzz "$work/bin/ThermalSampling.Cli.dll"

mkdir -p "$work/seeds"
cp docs/examples/scenarios/*.json "$work/seeds/"
cp tests/fuzz-findings/*.json "$work/seeds/" 2> /dev/null || true

echo "== fuzzing for $seconds s"
export AFL_SKIP_BIN_CHECK=1 AFL_NO_UI=1 AFL_I_DONT_CARE_ABOUT_MISSING_CRASHES=1 AFL_SKIP_CPUFREQ=1
afl-fuzz -i "$work/seeds" -o "$work/findings" -t 10000 -m none -V "$seconds" -- dotnet "$work/bin/ThermalSampling.Fuzz.dll" || true

crashes=$(find "$work/findings" -path '*crashes/id*' -type f 2> /dev/null | wc -l)
execs=$(grep -h '^execs_done' "$work"/findings/*/fuzzer_stats 2> /dev/null | awk '{s += $3} END {print s + 0}')
paths=$(grep -h '^corpus_count' "$work"/findings/*/fuzzer_stats 2> /dev/null | awk '{s += $3} END {print s + 0}')
echo "== $execs executions, $paths inputs in the corpus, $crashes crashes"
if [ "$crashes" -gt 0 ]; then
  for f in $(find "$work/findings" -path '*crashes/id*' -type f); do
    cp "$f" "tests/fuzz-findings/crash-$(sha256sum "$f" | cut -c1-16).json"
  done
  echo "crashes copied to tests/fuzz-findings/; replay: dotnet $work/bin/ThermalSampling.Fuzz.dll replay tests/fuzz-findings"
  exit 1
fi
