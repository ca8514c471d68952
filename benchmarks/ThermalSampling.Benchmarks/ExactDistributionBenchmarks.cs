using BenchmarkDotNet.Attributes;
using ThermalSampling.Analysis;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Units;

namespace ThermalSampling.Benchmarks;

/// <summary>The cost of one exact (quadrature) distribution: what a temperature sweep pays per temperature.</summary>
[MemoryDiagnoser]
public class ExactDistributionBenchmarks
{
    private PairLandscape<LennardJones> _line = null!;
    private PairLandscape<Morse> _radial = null!;

    [GlobalSetup]
    public void Setup()
    {
        _line = PairLandscape.Line(LennardJones.FromMinimum(Length.FromAngstroms(3.8), Energy.FromElectronVolts(0.0103)), Length.FromAngstroms(3.2), Length.FromAngstroms(6.0));
        _radial = PairLandscape.Radial(new Morse(Energy.FromElectronVolts(0.4174), 1.3885, Length.FromAngstroms(2.845)), Length.FromAngstroms(2.0), Length.FromAngstroms(5.0));
    }

    [Benchmark]
    public double LennardJonesLine() => ExactPairDistribution.Compute(_line, Temperature.FromKelvin(20)).VarianceInAngstromsSquared;

    [Benchmark]
    public double MorseRadial() => ExactPairDistribution.Compute(_radial, Temperature.FromKelvin(300)).VarianceInAngstromsSquared;
}
