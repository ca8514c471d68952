#!/usr/bin/env bash
# Mutation testing of the core library with dotnet-stryker from the local tool manifest. Not part of CI: it takes tens of
# minutes on two cores. Reports go to artifacts/mutation/<mode>/ (HTML and JSON); the scores are recorded in
# docs/validation.md.
#   eng/mutation-testing.sh [core|sampling|checkpoints] [extra stryker arguments]
# core (default): Potentials and Statistics, against the fast unit-test classes.
# sampling: the Sampling namespace except the vector-lane kernel files (Lanes.cs, LaneShared.cs, PairLaneChains.cs,
#   SiteLaneChains.cs). Under Stryker's per-expression mutant switches those inner loops run tens of times slower, and
#   every sampler test runs through them, so mutating them would take hours; they are checked bit for bit against the
#   scalar path at every width (LaneKernelTests) and against exact quadrature instead. Even so this mode has about 1500
#   mutants to test and ran for more than two hours on two cores without finishing (the direct samplers' loops and the batch
#   stores are hot). The checkpoints mode below scores two of its files on their own.
# checkpoints: the checkpoint code only (Checkpoints.cs, CheckpointState.cs) against the fast checkpoint tests; 498
#   mutants, not finished within the 20 minutes it was once given.
set -euo pipefail
cd "$(dirname "$0")/.."
mode=core
if [[ "${1:-}" == core || "${1:-}" == sampling || "${1:-}" == checkpoints ]]; then
  mode=$1
  shift
fi
# The slow end-to-end checkpoint tests (real processes, the 50-million-step cancellation, the 100-case property) are left out.
fast_checkpoints='(FullyQualifiedName~.CheckpointTests.&FullyQualifiedName!~Cancellation&FullyQualifiedName!~WhereverItIsCancelled)'
if [[ $mode == core ]]; then
  mutate=(--mutate '**/Potentials/**/*.cs' --mutate '**/Statistics/**/*.cs')
  filter="FullyQualifiedName~PotentialTests|FullyQualifiedName~PotentialEdgeTests|FullyQualifiedName~StatisticsTests|FullyQualifiedName~StatisticsEdgeTests|FullyQualifiedName~RandomnessTests|FullyQualifiedName~TestingPackageTests|FullyQualifiedName~AnalysisTests|FullyQualifiedName~RHatAndBlockTests|FullyQualifiedName~WrapperAndBlockingTests|$fast_checkpoints"
elif [[ $mode == checkpoints ]]; then
  mutate=(--mutate '**/Sampling/Checkpoints.cs' --mutate '**/Sampling/CheckpointState.cs')
  filter="$fast_checkpoints"
else
  mutate=(--mutate '**/Sampling/**/*.cs' --mutate '!**/Sampling/Lanes.cs' --mutate '!**/Sampling/LaneShared.cs'
          --mutate '!**/Sampling/PairLaneChains.cs' --mutate '!**/Sampling/SiteLaneChains.cs')
  filter="FullyQualifiedName~LaneKernelTests|FullyQualifiedName~RHatAndBlockTests|FullyQualifiedName~PairSamplerTests.Inverse_cdf|FullyQualifiedName~PairSamplerTests.Direct|FullyQualifiedName~SiteSamplerTests|FullyQualifiedName~HostileInputTests|$fast_checkpoints"
fi
dotnet tool restore > /dev/null
cd tests/ThermalSampling.Tests
dotnet tool run dotnet-stryker \
  --project ThermalSampling.csproj \
  "${mutate[@]}" \
  --test-case-filter "$filter" \
  --configuration Release \
  --reporter html --reporter json --reporter progress \
  --concurrency 2 \
  --output "../../artifacts/mutation/$mode" \
  "$@"
