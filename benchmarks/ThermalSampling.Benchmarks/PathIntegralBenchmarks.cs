using System;
using System.Globalization;
using BenchmarkDotNet.Attributes;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Reports;
using ThermalSampling.Sampling;
using ThermalSampling.Units;

namespace ThermalSampling.Benchmarks;

/// <summary>
/// What a path-integral bead costs against a classical step of the same landscape, in one run: the classical chains
/// (baseline) against ring polymers of 32 beads, per bead-step (a step moves the whole ring: one translation and one
/// staging sweep, so every bead's energy is evaluated about twice per step). Line: an invented Morse pair (0.3 eV, 1.8/Å,
/// 2.0 Å) of 2 u at 30 K; site: the invented fcc cage (12 Lennard-Jones neighbours, 10 meV at 3.5 Å) with 20 u at 5 K.
/// 16 chains, one thread, the widest native vector.
/// </summary>
[MemoryDiagnoser]
public class RingStepCostBenchmarks
{
    private const int Chains = 16;
    private const int ClassicalSteps = 320_000;
    private const int Beads = 32;
    private const int RingSteps = ClassicalSteps / Beads;
    private PairLandscape<Morse> _line = null!;
    private SiteLandscape<LennardJones> _cage = null!;
    private PairSummary.References _lineReferences = null!;
    private Analysis.SiteHarmonicEstimate _cageHarmonic = null!;
    private static readonly Temperature LineT = Temperature.FromKelvin(30), CageT = Temperature.FromKelvin(5);

    [GlobalSetup]
    public void Setup()
    {
        _line = PairLandscape.Line(new Morse(Energy.FromElectronVolts(0.3), 1.8, Length.FromAngstroms(2.0)), Length.FromAngstroms(1.2), Length.FromAngstroms(4.5));
        _lineReferences = PairSummary.Analyse(_line, Mass.FromAtomicMassUnits(2), LineT);
        var lj = LennardJones.FromMinimum(Length.FromAngstroms(3.5), Energy.FromElectronVolts(0.010));
        _cage = SiteLandscape.Create(lj, LatticeSites.NeighbourCage(LatticeKind.FaceCentredCubic, Length.FromAngstroms(3.5)), Position.Origin,
            Confinement.Sphere(Length.FromAngstroms(1.2)));
        _cageHarmonic = Analysis.SiteAnalysis.Harmonic(_cage, Mass.FromAtomicMassUnits(20), CageT);
    }

    internal static SamplingSettings Settings(int steps) => new() { Seed = 1, Chains = Chains, SamplesPerChain = steps, BurnIn = 1000, MaxThreads = 1 };

    private double Line(RingPlan? ring, int steps)
        => PairChains.Sample(_line, _lineReferences.Exact, 2.0, 0.05, 0.44, LineT, Settings(steps), null, default, null, 0, ChainRange.All(Chains), ring).Chains[0].Separation.Mean;

    private double Site(RingPlan? ring, int steps)
        => SiteChains.Sample(_cage, _cageHarmonic, 0.31, CageT, Settings(steps), null, default, null, 0, ChainRange.All(Chains), ring).Chains[0].PositionMoments.MeanX;

    private static RingPlan Ring(double massU, int segment) => new(Beads, segment, PhysicalConstants.HbarSquaredOverAtomicMassElectronVoltAngstromSquared / massU);

    /// <summary>Classical Metropolis on the line, per step.</summary>
    [Benchmark(Baseline = true, OperationsPerInvoke = Chains * ClassicalSteps)]
    public double LineClassicalStep() => Line(null, ClassicalSteps);

    /// <summary>The ring of 32 beads on the line, per bead-step (staging length 4, as the default rule picks at ħω/kT = 24.7).</summary>
    [Benchmark(OperationsPerInvoke = Chains * RingSteps * Beads)]
    public double LineRingBeadStep() => Line(Ring(2, 4), RingSteps);

    /// <summary>Classical Metropolis in the 12-neighbour cage, per step.</summary>
    [Benchmark(OperationsPerInvoke = Chains * ClassicalSteps)]
    public double SiteClassicalStep() => Site(null, ClassicalSteps);

    /// <summary>The ring of 32 beads in the cage, per bead-step (staging length 2, as the default rule picks at ħω/kT = 16.3).</summary>
    [Benchmark(OperationsPerInvoke = Chains * RingSteps * Beads)]
    public double SiteRingBeadStep() => Site(Ring(20, 2), RingSteps);
}

/// <summary>
/// Time per ring step at P = 8, 32 and 128 beads, staging against the plain single-bead move, on the invented harmonic
/// line (k = 2 eV/Å², 4 u, 20 K: ħω/kT = 26.5) with 16 chains on one thread; with the effective samples per step of the
/// quantum mean-square displacement that <c>--ring-ess</c> prints, this gives ESS per CPU-second.
/// </summary>
[MemoryDiagnoser]
public class RingEfficiencyBenchmarks
{
    internal const int Steps = 16_000;

    /// <summary>P.</summary>
    [Params(8, 32, 128)]
    public int Beads { get; set; }

    /// <summary>Staging (the library's walk).</summary>
    [Benchmark(Baseline = true, OperationsPerInvoke = 16 * Steps)]
    public double Staging() => RingEfficiency.Run(Beads, RingMoves.Staging, Steps).Variance.Value;

    /// <summary>The plain single-bead move.</summary>
    [Benchmark(OperationsPerInvoke = 16 * Steps)]
    public double SingleBead() => RingEfficiency.Run(Beads, RingMoves.SingleBead, Steps).Variance.Value;
}

/// <summary>The harmonic line of <see cref="RingEfficiencyBenchmarks"/>, and the effective samples per step of its quantum MSD (<c>--ring-ess</c>).</summary>
internal static class RingEfficiency
{
    private const double Stiffness = 2, MassU = 4;
    private static readonly PairLandscape<HarmonicBond> Landscape = PairLandscape.Line(new HarmonicBond(Stiffness, Length.FromAngstroms(3)), Length.FromAngstroms(1), Length.FromAngstroms(5));
    private static readonly Temperature T = Temperature.FromKelvin(20);

    internal static PairVibrationReport Run(int beads, RingMoves moves, int steps)
    {
        var mass = Mass.FromAtomicMassUnits(MassU);
        var references = PairSummary.Analyse(Landscape, mass, T);
        double ratio = references.Harmonic!.QuantumToThermalRatio;
        var settings = RingStepCostBenchmarks.Settings(steps) with { BurnIn = 2000 };
        var ring = new RingPlan(beads, PathIntegralSampler.StagingLinks(beads, ratio), PhysicalConstants.HbarSquaredOverAtomicMassElectronVoltAngstromSquared / MassU, moves);
        var record = PairChains.Sample(Landscape, references.Exact, 3.0, 0.03, 0.44, T, settings, null, default, null, 0, ChainRange.All(16), ring);
        return PairSummary.Summarise(Landscape, mass, T, settings, references, record, pathIntegral: true);
    }

    /// <summary>ESS per step of the variance (the line's MSD): Var((x − ⟨x⟩)²)/SE² = (κ + 2)σ⁴/SE² over the 16 chains' steps.</summary>
    internal static void Print()
    {
        var c = CultureInfo.InvariantCulture;
        Console.WriteLine("| P | moves | staging length | acceptance (translation) | MSD ESS per ring step (16 chains × 100 000 steps) |");
        Console.WriteLine("|---:|---|---:|---:|---:|");
        foreach (int p in new[] { 8, 32, 128 })
        {
            foreach (var moves in new[] { RingMoves.Staging, RingMoves.SingleBead })
            {
                var r = Run(p, moves, 100_000);
                double sigma2 = r.Variance.Value, se = r.Variance.StandardError;
                double ess = (r.ExcessKurtosis + 2) * sigma2 * sigma2 / (se * se);
                Console.WriteLine(string.Format(c, "| {0} | {1} | {2} | {3:F2} | {4:G3} |", p, moves, PathIntegralSampler.StagingLinks(p, 26.5), r.Diagnostics.AcceptanceRate,
                    ess / (16.0 * 100_000)));
            }
        }
    }
}
