#!/usr/bin/env bash
# Mutation testing of the core library (Potentials, Statistics, Sampling) with dotnet-stryker from the local tool
# manifest. Not part of CI: it takes tens of minutes on two cores. Reports go to artifacts/mutation/ (HTML and JSON);
# the score is recorded in docs/validation.md.
#   eng/mutation-testing.sh [extra stryker arguments]
# By default it mutates Potentials and Statistics and runs the fast unit-test classes against them: with Stryker's
# per-expression mutant switches the sampler loops run tens of times slower, so the statistical sampler tests would
# take hours. Pass --mutate '**/Sampling/**/*.cs' and a wider --test-case-filter to include the samplers.
set -euo pipefail
cd "$(dirname "$0")/.."
dotnet tool restore > /dev/null
cd tests/ThermalSampling.Tests
dotnet tool run dotnet-stryker \
  --project ThermalSampling.csproj \
  --mutate '**/Potentials/**/*.cs' --mutate '**/Statistics/**/*.cs' \
  --test-case-filter 'FullyQualifiedName~PotentialTests|FullyQualifiedName~StatisticsTests|FullyQualifiedName~RandomnessTests|FullyQualifiedName~TestingPackageTests|FullyQualifiedName~AnalysisTests|FullyQualifiedName~RHatAndBlockTests|FullyQualifiedName~WrapperAndBlockingTests' \
  --configuration Release \
  --reporter html --reporter json --reporter progress \
  --concurrency 2 \
  --output ../../artifacts/mutation \
  "$@"
