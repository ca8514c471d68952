using System.Collections.Generic;
using System.Linq;
using BenchmarkDotNet.Attributes;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Sampling;
using ThermalSampling.Units;

namespace ThermalSampling.Benchmarks;

/// <summary>
/// Reweighting 10 sampled runs (an invented Lennard-Jones pair, 15 meV at 3.5 Å, 50 u, on [3.0, 5.0] Å, at 10, 13, …, 37 K;
/// 8 chains × 20 000 draws each) onto 200 temperatures between them (target: at most 1 s). Baseline: summarising the same
/// 10 records into their reports, in the same run.
/// </summary>
[MemoryDiagnoser]
public class ReweightingBenchmarks
{
    private static readonly PairLandscape<LennardJones> Line =
        PairLandscape.Line(LennardJones.FromMinimum(Length.FromAngstroms(3.5), Energy.FromElectronVolts(0.015)), Length.FromAngstroms(3.0), Length.FromAngstroms(5.0));
    private List<TemperatureRecord> _runs = null!;
    private List<Temperature> _targets = null!;

    [GlobalSetup]
    public void Setup()
    {
        var settings = new SamplingSettings { Seed = 1, Chains = 8, SamplesPerChain = 20_000, BurnIn = 2_000 };
        _runs = [.. Enumerable.Range(0, 10).Select(i => PairSampler.Sample(Line, Temperature.FromKelvin(10 + 3 * i), settings))];
        _targets = [.. Enumerable.Range(0, 200).Select(i => Temperature.FromKelvin(10 + 27.0 * i / 199))];
    }

    /// <summary>The ten reports from their records.</summary>
    [Benchmark(Baseline = true)]
    public double SummariseTenRuns() => _runs.Sum(r => PairSampler.Summarise(Line, Mass.FromAtomicMassUnits(50), r).Variance.Value);

    /// <summary>200 reweighted temperatures, with jackknife errors over 64 groups.</summary>
    [Benchmark]
    public double ReweightOntoTwoHundred() => Reweighting.Pair(Line, _runs, _targets).Sum(r => r.Variance.Value);
}

/// <summary>
/// A 1000-point sweep with no sampling (target: at most 2 s): the exact quadrature, the harmonic and the first-order
/// estimates of an invented Lennard-Jones line (15 meV at 3.5 Å, 50 u, on [3.0, 5.0] Å) at 1000 temperatures from 1 to
/// 100 K. Baseline: the exact quadrature alone, in the same run.
/// </summary>
[MemoryDiagnoser]
public class AnalysisSweepBenchmarks
{
    private static readonly PairLandscape<LennardJones> Line =
        PairLandscape.Line(LennardJones.FromMinimum(Length.FromAngstroms(3.5), Energy.FromElectronVolts(0.015)), Length.FromAngstroms(3.0), Length.FromAngstroms(5.0));
    private static readonly Temperature[] Temperatures = [.. Enumerable.Range(0, 1000).Select(i => Temperature.FromKelvin(1 + 99.0 * i / 999))];

    /// <summary>Exact quadrature only.</summary>
    [Benchmark(Baseline = true)]
    public double ExactOnly() => Temperatures.Sum(t => Analysis.ExactPairDistribution.Compute(Line, t).VarianceInAngstromsSquared);

    /// <summary>Exact, harmonic and first order at every temperature.</summary>
    [Benchmark]
    public double ExactHarmonicFirstOrder() => Temperatures.Sum(t => Analysis.ExactPairDistribution.Compute(Line, t).VarianceInAngstromsSquared
        + Analysis.PairAnalysis.Harmonic(Line, Mass.FromAtomicMassUnits(50), t).ClassicalVarianceInAngstromsSquared
        + Analysis.PairAnalysis.FirstOrder(Line, t).VarianceInAngstromsSquared);
}
