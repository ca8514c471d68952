#!/usr/bin/env bash
# Mutation testing of the core library with dotnet-stryker from the local tool manifest. Not part of CI: it takes tens of
# minutes on two cores. Reports go to artifacts/mutation/<mode>/ (HTML and JSON); the scores are recorded in
# docs/validation.md.
#   eng/mutation-testing.sh [core|pair|site|chains|checkpoints] [extra stryker arguments]
# core (default): Potentials and Statistics, against the fast unit-test classes.
# The Sampling namespace is split into four modes of two files each; the whole namespace in one run (about 1 500
# mutants) ran for more than two hours without finishing, and Stryker writes its report only at the end. One two-file
# mode (pair) takes about 48 minutes on two cores with the 30 s of slack in eng/stryker-config.json (needed: two test
# hosts share two cores, and survivors ran past the default limit). Run it in a separate clone on an otherwise idle
# machine.
#   pair: PairSampler.cs, PairChains.cs, PairSummary.cs, InverseCdfTable.cs
#   site: SiteSampler.cs, SiteChains.cs, SiteSummary.cs, SiteKernels.cs
#   chains: ChainInfrastructure.cs, LaneEngine.cs, SamplingSettings.cs, ReportParts.cs, Sweeps.cs
#   checkpoints: Checkpoints.cs, CheckpointState.cs, Persistence/StateFormat.cs
# The vector-lane kernel files (Numerics/Lanes.cs, LaneShared.cs, PairLaneChains.cs, SiteLaneChains.cs) are in no mode, and
# carry "Stryker disable all" comments so that no mode puts mutants in them. Under
# Stryker's per-expression mutant switches those inner loops run tens of times slower, and every sampler test runs through
# them; they are checked bit for bit against the scalar path at every width (LaneKernelTests) and against exact
# quadrature instead.
set -euo pipefail
cd "$(dirname "$0")/.."
mode=core
if [[ "${1:-}" =~ ^(core|pair|site|chains|checkpoints)$ ]]; then
  mode=$1
  shift
fi
# The slow end-to-end checkpoint tests (real processes, the 50-million-step cancellation, the 100-case property) are left out.
fast_checkpoints='(FullyQualifiedName~.CheckpointTests.&FullyQualifiedName!~Cancellation&FullyQualifiedName!~WhereverItIsCancelled)'
if [[ $mode == core ]]; then
  mutate=(--mutate '**/Potentials/**/*.cs' --mutate '**/Statistics/**/*.cs')
  filter="FullyQualifiedName~PotentialTests|FullyQualifiedName~PotentialEdgeTests|FullyQualifiedName~StatisticsTests|FullyQualifiedName~StatisticsEdgeTests|FullyQualifiedName~RandomnessTests|FullyQualifiedName~TestingPackageTests|FullyQualifiedName~AnalysisTests|FullyQualifiedName~RHatAndBlockTests|FullyQualifiedName~WrapperAndBlockingTests|$fast_checkpoints"
elif [[ $mode == checkpoints ]]; then
  mutate=(--mutate '**/Sampling/Checkpoints.cs' --mutate '**/Sampling/CheckpointState.cs' --mutate '**/Persistence/StateFormat.cs')
  filter="FullyQualifiedName~CheckpointFormatTests|FullyQualifiedName~CheckpointSessionTests|$fast_checkpoints"
elif [[ $mode == pair ]]; then
  mutate=(--mutate '**/ThermalSampling/PairSampler.cs' --mutate '**/Sampling/PairChains.cs' --mutate '**/Reports/PairSummary.cs' --mutate '**/Sampling/InverseCdfTable.cs')
  filter="FullyQualifiedName~PairSamplerTests|FullyQualifiedName~PairSamplerEdgeTests|FullyQualifiedName~HostileInputTests|(FullyQualifiedName~LaneKernelTests&FullyQualifiedName!~Site)|$fast_checkpoints"
elif [[ $mode == site ]]; then
  mutate=(--mutate '**/ThermalSampling/SiteSampler.cs' --mutate '**/Sampling/SiteChains.cs' --mutate '**/Reports/SiteSummary.cs' --mutate '**/Sampling/SiteKernels.cs')
  filter="FullyQualifiedName~SiteSamplerTests|FullyQualifiedName~SiteSamplerEdgeTests|FullyQualifiedName~HostileInputTests|(FullyQualifiedName~LaneKernelTests&FullyQualifiedName~Site)|$fast_checkpoints"
else
  mutate=(--mutate '**/Sampling/ChainInfrastructure.cs' --mutate '**/Sampling/LaneEngine.cs' --mutate '**/Sampling/SamplingSettings.cs' --mutate '**/Reports/ReportParts.cs' --mutate '**/ThermalSampling/Sweeps.cs')
  filter="FullyQualifiedName~ChainInfrastructureTests|FullyQualifiedName~RHatAndBlockTests|FullyQualifiedName~PairSamplerTests|FullyQualifiedName~PairSamplerEdgeTests|FullyQualifiedName~HostileInputTests|$fast_checkpoints"
fi
# Serial test classes, so that Stryker credits each mutant to the tests that really reach it (see the test project file).
export ThermalSamplingSerialTests=true
dotnet tool restore > /dev/null
cd tests/ThermalSampling.Tests
dotnet tool run dotnet-stryker \
  --project ThermalSampling.csproj \
  "${mutate[@]}" \
  --test-case-filter "$filter" \
  --configuration Release \
  --reporter html --reporter json --reporter progress \
  --concurrency 2 \
  --config-file ../../eng/stryker-config.json \
  --output "../../artifacts/mutation/$mode" \
  "$@"
