using System;
using System.Linq;
using ThermalSampling.Potentials;
using ThermalSampling.Randomness;
using ThermalSampling.Statistics;
using ThermalSampling.Units;
using Xunit;

namespace ThermalSampling.Tests;

/// <summary>Direct checks of the potential wrappers and of the blocking estimator (found thin by mutation testing).</summary>
public sealed class WrapperAndBlockingTests
{
    private static readonly LennardJones Lj = LennardJones.FromMinimum(Length.FromAngstroms(3.8), Energy.FromElectronVolts(0.0103));

    [Fact]
    public void ACutOffPotentialIsTheInnerOneBelowTheCutOffAndZeroFromIt()
    {
        var cut = new CutOffPotential<LennardJones>(Lj, Length.FromAngstroms(8.0));
        foreach (double r in new[] { 3.0, 3.8, 5.5, 7.999 })
        {
            Assert.Equal(Lj.Energy(r), cut.Energy(r));
            Assert.Equal(Lj.EnergyAtSquaredDistance(r * r), cut.EnergyAtSquaredDistance(r * r));
            Assert.Equal(Lj.Derivatives(r), cut.Derivatives(r));
        }
        foreach (double r in new[] { 8.0, 8.001, 20.0 })
        {
            Assert.Equal(0.0, cut.Energy(r));
            Assert.Equal(0.0, cut.EnergyAtSquaredDistance(r * r));
            Assert.Equal(default, cut.Derivatives(r));
        }
        Assert.Equal(new PotentialWell(3.8, Lj.Energy(3.8), -Lj.Energy(3.8)), cut.Well);
        Assert.Null(new CutOffPotential<LennardJones>(Lj, Length.FromAngstroms(3.5)).Well); // the minimum lies beyond the cut-off
        Assert.Contains("cut off at 8 Å", cut.Description, StringComparison.Ordinal);
        Assert.Throws<ArgumentOutOfRangeException>(() => new CutOffPotential<LennardJones>(Lj, Length.FromAngstroms(0)));
    }

    [Fact]
    public void AShiftedCutOffPotentialIsContinuousAtTheCutOff()
    {
        double rc = 8.0, shift = Lj.Energy(rc);
        var cut = new ShiftedCutOffPotential<LennardJones>(Lj, Length.FromAngstroms(rc));
        foreach (double r in new[] { 3.0, 3.8, 6.0 })
        {
            double expected = Lj.Energy(r) - shift, tolerance = 1e-15 * Math.Abs(Lj.Energy(r)) + 1e-18; // the shift is stored, not recomputed
            Assert.Equal(expected, cut.Energy(r), tolerance);
            Assert.Equal(expected, cut.EnergyAtSquaredDistance(r * r), tolerance);
            var d = cut.Derivatives(r);
            Assert.Equal(expected, d.Energy, tolerance);
            Assert.Equal(Lj.Derivatives(r).First, d.First);
        }
        Assert.Equal(0.0, cut.Energy(rc), 15);
        Assert.Equal(0.0, cut.Energy(rc - 1e-9), 12);
        Assert.Equal(0.0, cut.EnergyAtSquaredDistance(rc * rc));
        // Beyond the cut-off it is zero, not the inner energy minus the shift (which is zero only at r_c itself).
        Assert.Equal(0.0, cut.Energy(rc + 1));
        Assert.Equal(0.0, cut.EnergyAtSquaredDistance((rc + 1) * (rc + 1)));
        Assert.Equal(default, cut.Derivatives(rc + 1));
        var well = cut.Well!;
        Assert.Equal(Lj.Energy(3.8) - shift, well.MinimumEnergyInElectronVolts, 15);
        Assert.Equal(shift - Lj.Energy(3.8), well.WellDepthInElectronVolts, 15);
        Assert.Contains("shifted", cut.Description, StringComparison.Ordinal);
        Assert.Throws<ArgumentOutOfRangeException>(() => new ShiftedCutOffPotential<LennardJones>(Lj, Length.FromAngstroms(-1)));
    }

    [Fact]
    public void ASumAddsEnergiesAndDerivativesOnTheCommonDomain()
    {
        var bond = new HarmonicBond(0.5, Length.FromAngstroms(4.2));
        var sum = new SumPotential<LennardJones, HarmonicBond>(Lj, bond);
        foreach (double r in new[] { 3.5, 4.0, 4.4, 6.0 })
        {
            Assert.Equal(Lj.Energy(r) + bond.Energy(r), sum.Energy(r));
            Assert.Equal(Lj.EnergyAtSquaredDistance(r * r) + bond.EnergyAtSquaredDistance(r * r), sum.EnergyAtSquaredDistance(r * r));
            Assert.Equal(Lj.Derivatives(r) + bond.Derivatives(r), sum.Derivatives(r));
        }
        // The minimum of the sum: V'(r) = 0 between the two minima, found numerically; check it against the derivative.
        var well = sum.Well!;
        Assert.InRange(well.EquilibriumDistanceInAngstroms, 3.8, 4.2);
        Assert.Equal(0.0, sum.Derivatives(well.EquilibriumDistanceInAngstroms).First, 8);
        Assert.Equal(sum.Energy(well.EquilibriumDistanceInAngstroms), well.MinimumEnergyInElectronVolts, 12);
        Assert.Contains(Lj.Description, sum.Description, StringComparison.Ordinal);
        Assert.Contains(bond.Description, sum.Description, StringComparison.Ordinal);

        var buckingham = new Buckingham(Energy.FromElectronVolts(22764.0), Length.FromAngstroms(0.149), 27.88); // Sources.Buckingham
        var mixed = new SumPotential<LennardJones, Buckingham>(Lj, buckingham, Length.FromAngstroms(2.0), Length.FromAngstroms(8.0));
        Assert.Equal(Math.Max(Lj.DomainLower, buckingham.DomainLower), mixed.DomainLower);
        Assert.Equal(Math.Min(Lj.DomainUpper, buckingham.DomainUpper), mixed.DomainUpper);
        Assert.Equal("wellSearchUpper", Assert.ThrowsAny<ArgumentException>(() => new SumPotential<LennardJones, HarmonicBond>(Lj, bond, Length.FromAngstroms(6), Length.FromAngstroms(5))).ParamName);
    }

    /// <summary>
    /// The levels against a plain implementation of the published procedure ([paper] Flyvbjerg &amp; Petersen, J. Chem.
    /// Phys. 91, 461 (1989), eqs. 27–29): at each level σ(x̄) ≈ √(c₀/(n − 1)) with c₀ the biased variance, its own error
    /// σ/√(2(n − 1)), then neighbouring pairs averaged (an odd last value dropped).
    /// </summary>
    [Theory]
    [InlineData(4)]
    [InlineData(100)]
    [InlineData(1023)]
    public void BlockingLevelsMatchThePublishedProcedure(int n)
    {
        var random = RandomStream.FromSeed(41);
        var x = Enumerable.Range(0, n).Select(_ => 3 + random.NextStandardNormal()).ToArray();
        var estimate = Blocking.Estimate(x);
        var level = x;
        long size = 1;
        int k = 0;
        while (level.Length >= 2)
        {
            double mean = level.Average();
            double c0 = level.Select(v => (v - mean) * (v - mean)).Sum() / level.Length;
            double se = Math.Sqrt(c0 / (level.Length - 1));
            var got = estimate.Levels[k];
            Assert.Equal(size, got.BlockSize);
            Assert.Equal(level.Length, got.BlockCount);
            Assert.Equal(se, got.StandardError, 1e-13 * se + 1e-300);
            Assert.Equal(se / Math.Sqrt(2.0 * (level.Length - 1)), got.StandardErrorUncertainty, 1e-13 * se + 1e-300);
            level = Enumerable.Range(0, level.Length / 2).Select(i => 0.5 * (level[2 * i] + level[2 * i + 1])).ToArray();
            size *= 2;
            k++;
        }
        Assert.Equal(k, estimate.Levels.Length);
    }

    [Fact]
    public void BlockingPicksTheFirstPlateauAndSaysWhenThereIsNone()
    {
        var random = RandomStream.FromSeed(42);
        var iid = Enumerable.Range(0, 4096).Select(_ => random.NextStandardNormal()).ToArray();
        var flat = Blocking.Estimate(iid);
        Assert.True(flat.IsReliable);
        Assert.Equal("", flat.Reason);
        Assert.InRange(flat.ChosenLevel, 0, 2);
        Assert.InRange(flat.StandardError, 0.8 / 64, 1.2 / 64);

        // AR(1) with φ = 0.95: Var(x̄) ≈ σ²(1 + φ)/(1 − φ)/N (closed form), reached only after a few levels.
        double x = 0;
        var ar = new double[1 << 16];
        for (int i = 0; i < ar.Length; i++)
        {
            x = 0.95 * x + Math.Sqrt(1 - 0.95 * 0.95) * random.NextStandardNormal();
            ar[i] = x;
        }
        var correlated = Blocking.Estimate(ar);
        Assert.True(correlated.IsReliable);
        Assert.True(correlated.ChosenLevel >= 3, $"chosen level {correlated.ChosenLevel}");
        double exact = Math.Sqrt(1.95 / 0.05 / ar.Length);
        Assert.InRange(correlated.StandardError, 0.75 * exact, 1.25 * exact);

        var shortRun = Blocking.Estimate(ar.Take(64).ToArray());
        Assert.False(shortRun.IsReliable);
        Assert.Contains("still rising", shortRun.Reason, StringComparison.Ordinal);
        Assert.Equal(Math.Max(0, shortRun.Levels.Count(l => l.BlockCount >= Blocking.MinimumBlocksForPlateau) - 1), shortRun.ChosenLevel);
    }

    [Fact]
    public void BlockingRefusesShortOrNonFiniteSeriesByName()
    {
        Assert.Equal("series", Assert.Throws<ArgumentException>(() => Blocking.Estimate(new double[3])).ParamName);
        Assert.Equal("series", Assert.ThrowsAny<ArgumentException>(() => Blocking.Estimate(new[] { 1.0, 2, double.PositiveInfinity, 4 })).ParamName);
        Assert.Equal(4, Blocking.Estimate(new[] { 1.0, 2, 3, 4 }).Levels[0].BlockCount);
    }
}
