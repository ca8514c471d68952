#!/usr/bin/env bash
# Mutation testing of the core library (Potentials, Statistics, Sampling) with dotnet-stryker from the local tool
# manifest. Not part of CI: it takes tens of minutes on two cores. Reports go to artifacts/mutation/ (HTML and JSON);
# the score is recorded in docs/validation.md.
#   eng/mutation-testing.sh [extra stryker arguments]
set -euo pipefail
cd "$(dirname "$0")/.."
dotnet tool restore > /dev/null
cd tests/ThermalSampling.Tests
dotnet tool run dotnet-stryker \
  --project ThermalSampling.csproj \
  --mutate '**/Potentials/**/*.cs' --mutate '**/Statistics/**/*.cs' --mutate '**/Sampling/**/*.cs' \
  --reporter html --reporter json --reporter progress \
  --concurrency 2 \
  --output ../../artifacts/mutation \
  "$@"
