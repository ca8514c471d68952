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

/// <summary>
/// The exact quantum distribution of a pair on its grid, one temperature, everything included (grid refinement and, for
/// radial, the l sum): an invented Morse pair (0.5 eV, 1.5/Å, 2.5 Å, 30 u) on [1.9, 4.5] Å. Baseline: the exact
/// classical quadrature of the same landscape in the same run.
/// </summary>
[MemoryDiagnoser]
public class QuantumGridBenchmarks
{
    private static readonly Morse Well = new(Energy.FromElectronVolts(0.5), 1.5, Length.FromAngstroms(2.5));
    private static readonly PairLandscape<Morse> Line = PairLandscape.Line(Well, Length.FromAngstroms(1.9), Length.FromAngstroms(4.5));
    private static readonly PairLandscape<Morse> Radial = PairLandscape.Radial(Well, Length.FromAngstroms(1.9), Length.FromAngstroms(4.5));

    [Benchmark(Baseline = true)]
    public double ClassicalQuadratureLine300K() => ExactPairDistribution.Compute(Line, Temperature.FromKelvin(300)).VarianceInAngstromsSquared;

    [Benchmark]
    public double QuantumLine30K() => QuantumPairDistribution.Compute(Line, Mass.FromAtomicMassUnits(30), Temperature.FromKelvin(30)).VarianceInAngstromsSquared;

    [Benchmark]
    public double QuantumLine300K() => QuantumPairDistribution.Compute(Line, Mass.FromAtomicMassUnits(30), Temperature.FromKelvin(300)).VarianceInAngstromsSquared;

    [Benchmark]
    public double QuantumRadial300K() => QuantumPairDistribution.Compute(Radial, Mass.FromAtomicMassUnits(30), Temperature.FromKelvin(300)).VarianceInAngstromsSquared;
}
