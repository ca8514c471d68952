using System;
using System.Linq;
using ThermalSampling.Analysis;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Reports;
using ThermalSampling.Sampling;
using ThermalSampling.Statistics;
using ThermalSampling.Units;
using Xunit;
using Xunit.Abstractions;

namespace ThermalSampling.Tests;

/// <summary>Path-integral Monte Carlo: the ring-polymer walk on the lane engine, against closed forms and the exact grid.</summary>
public class PathIntegralTests(ITestOutputHelper output)
{
    private static readonly double Hbar2OverU = PhysicalConstants.HbarSquaredOverAtomicMassElectronVoltAngstromSquared;

    /// <summary>
    /// The primitive discretisation's exact bead variance for a harmonic well, from the ring's normal modes (derived in
    /// docs/quantum.md): ⟨x²⟩_P = Σ_{k=0}^{P−1} 1/[βmω² + (4mP²/(βħ²)) sin²(πk/P)].
    /// </summary>
    internal static double FiniteBeadVariance(double stiffness, double massU, double beta, int beads)
    {
        double sum = 0, mOverHbar2 = massU / Hbar2OverU;
        for (int k = 0; k < beads; k++)
        {
            double s = Math.Sin(Math.PI * k / beads);
            sum += 1 / (beta * stiffness + 4 * mOverHbar2 * beads * beads / beta * s * s);
        }
        return sum;
    }

    [Theory]
    [InlineData(1)]
    [InlineData(2)]
    [InlineData(4)]
    [InlineData(8)]
    [InlineData(32)]
    public void Raw_ring_walk_matches_the_finite_bead_variance(int beads)
    {
        const double k = 2.0, massU = 4, kelvin = 20;
        var bond = new HarmonicBond(k, Length.FromAngstroms(3));
        var landscape = PairLandscape.Line(bond, Length.FromAngstroms(1.0), Length.FromAngstroms(5.0));
        var t = Temperature.FromKelvin(kelvin);
        double beta = 1 / t.ThermalEnergyInElectronVolts;
        var references = PairSummary.Analyse(landscape, Mass.FromAtomicMassUnits(massU), t);
        var settings = new SamplingSettings { Seed = 7, Chains = 8, SamplesPerChain = 200_000, BurnIn = 20_000 };
        var ring = new RingPlan(beads, Math.Min(beads, 8), Hbar2OverU / massU);
        var record = PairChains.Sample(landscape, references.Exact, 3.0, 0.1, 0.44, t, settings, null, default, null, 0, ChainRange.All(8), ring);
        var m = record.Chains.Select(c => c.Separation).Aggregate((a, b) => MomentAccumulator.Merge(a, b));
        double expected = FiniteBeadVariance(k, massU, beta, beads);
        output.WriteLine($"P={beads}: sampled {m.Variance:G6} expected {expected:G6} ratio {m.Variance / expected:F4} accept {record.Chains.Average(c => (double)c.Accepted / c.Proposals):F3}");
        Assert.InRange(m.Variance / expected, 0.97, 1.03);
    }
}
