using System;
using System.Linq;
using FsCheck;
using FsCheck.Fluent;
using FsCheck.Xunit;
using ThermalSampling.Potentials;
using ThermalSampling.Units;
using Xunit;

namespace ThermalSampling.Tests;

public class PotentialTests
{
    private static readonly LennardJones Argon = LennardJones.FromSigmaEpsilon(Length.FromAngstroms(3.405), Energy.FromKelvin(119.8)); // Sources.Argon
    private static readonly Morse Copper = new(Energy.FromElectronVolts(0.3429), 1.3588, Length.FromAngstroms(2.866)); // Sources.GirifalcoWeizer
    private static readonly Buckingham OxygenOxygen = new(Energy.FromElectronVolts(22764.0), Length.FromAngstroms(0.149), 27.88); // Sources.Buckingham

    [Fact]
    public void Lennard_Jones_derivatives_at_the_minimum_match_the_closed_forms()
    {
        // Source: Sources.LennardJonesDerivatives
        var lj = LennardJones.FromMinimum(Length.FromAngstroms(3.5), Energy.FromElectronVolts(0.012));
        var d = lj.Derivatives(3.5);
        Assert.Equal(-0.012, d.Energy, 15);
        Assert.Equal(0.0, d.First, 14);
        Assert.Equal(72 * 0.012 / (3.5 * 3.5), d.Second, 14);
        Assert.Equal(-1512 * 0.012 / Math.Pow(3.5, 3), d.Third, 13);
        Assert.Equal(26712 * 0.012 / Math.Pow(3.5, 4), d.Fourth, 12);
    }

    [Fact]
    public void Lennard_Jones_parameterisations_agree_with_r0_equal_two_to_the_sixth_sigma()
    {
        // Source: Sources.LennardJonesDerivatives (r0 = 2^(1/6) sigma)
        var fromSigma = LennardJones.FromSigmaEpsilon(Length.FromAngstroms(3.405), Energy.FromElectronVolts(0.0103));
        var fromMinimum = LennardJones.FromMinimum(Length.FromAngstroms(Math.Pow(2, 1.0 / 6) * 3.405), Energy.FromElectronVolts(0.0103));
        foreach (double r in new[] { 3.0, 3.405, 3.82, 5.0, 9.0 })
        {
            Assert.Equal(fromSigma.Energy(r), fromMinimum.Energy(r), 15);
            Assert.Equal(4 * 0.0103 * (Math.Pow(3.405 / r, 12) - Math.Pow(3.405 / r, 6)), fromSigma.Energy(r), 14);
        }
        Assert.Equal(0.0, fromSigma.Energy(3.405), 15);
        Assert.Equal(3.405, fromMinimum.SigmaInAngstroms, 12);
    }

    [Fact]
    public void Morse_derivatives_at_the_minimum_match_the_closed_forms()
    {
        // Source: Sources.MorseDerivatives with Cu parameters from Sources.GirifalcoWeizer
        double dd = 0.3429, a = 1.3588;
        var d = Copper.Derivatives(2.866);
        Assert.Equal(-dd, d.Energy, 15);
        Assert.Equal(0.0, d.First, 14);
        Assert.Equal(2 * dd * a * a, d.Second, 14);
        Assert.Equal(-6 * dd * a * a * a, d.Third, 13);
        Assert.Equal(14 * dd * Math.Pow(a, 4), d.Fourth, 13);
        Assert.Equal(2.866, Copper.Well!.EquilibriumDistanceInAngstroms);
        Assert.Equal(dd, Copper.Well.WellDepthInElectronVolts);
    }

    [Fact]
    public void Buckingham_barrier_and_spurious_minimum_are_located()
    {
        // Source: Sources.Buckingham (values from memory: generous tolerance)
        Assert.InRange(OxygenOxygen.BarrierDistanceInAngstroms, 0.80, 0.95);
        Assert.InRange(OxygenOxygen.Well!.EquilibriumDistanceInAngstroms, 1.15, 1.35);
        // Both are stationary points of the analytic form.
        Assert.True(Math.Abs(OxygenOxygen.Derivatives(OxygenOxygen.BarrierDistanceInAngstroms).First) < 1e-6 * OxygenOxygen.BarrierEnergyInElectronVolts);
        Assert.True(Math.Abs(OxygenOxygen.Derivatives(OxygenOxygen.Well.EquilibriumDistanceInAngstroms).First) < 1e-8);
        Assert.True(OxygenOxygen.Derivatives(OxygenOxygen.BarrierDistanceInAngstroms).Second < 0, "the barrier is a maximum");
        Assert.True(OxygenOxygen.Derivatives(OxygenOxygen.Well.EquilibriumDistanceInAngstroms).Second > 0, "the well is a minimum");
        Assert.Equal(OxygenOxygen.BarrierDistanceInAngstroms, OxygenOxygen.DomainLower);
        // Inside the barrier the energy really does fall: the reason the domain stops there.
        Assert.True(OxygenOxygen.Energy(0.5 * OxygenOxygen.BarrierDistanceInAngstroms) < OxygenOxygen.BarrierEnergyInElectronVolts);
    }

    [Fact]
    public void Buckingham_without_dispersion_is_purely_repulsive()
    {
        var mgO = new Buckingham(Energy.FromElectronVolts(1428.5), Length.FromAngstroms(0.2945), 0);
        Assert.Null(mgO.Well);
        Assert.Equal(0.0, mgO.DomainLower);
    }

    [Fact]
    public void Buckingham_whose_dispersion_always_wins_is_refused()
    {
        var ex = Assert.Throws<ArgumentException>(() => new Buckingham(Energy.FromElectronVolts(1), Length.FromAngstroms(0.1), 1000));
        Assert.Equal("dispersionElectronVoltAngstrom6", ex.ParamName);
        Assert.Contains("minus infinity", ex.Message);
    }

    [Fact]
    public void Harmonic_bond_has_exact_derivatives()
    {
        var bond = new HarmonicBond(5.0, Length.FromAngstroms(1.2));
        var d = bond.Derivatives(1.5);
        Assert.Equal(0.5 * 5 * 0.09, d.Energy, 14);
        Assert.Equal(5 * 0.3, d.First, 14);
        Assert.Equal(5.0, d.Second);
        Assert.Equal(0.0, d.Third);
        Assert.Equal(0.0, d.Fourth);
        Assert.True(double.IsPositiveInfinity(bond.Well!.WellDepthInElectronVolts));
    }

    // Properties: every analytic derivative matches an independent finite difference of the order below,
    // over random valid parameters (common practice, no source).
    private static Arbitrary<(double Scale, double Depth, double RelativeR)> PairParameters() =>
        (from scale in Gen.Choose(150, 600)
         from depth in Gen.Choose(1, 2000)
         from rel in Gen.Choose(85, 250)
         select (scale / 100.0, depth / 1e4, rel / 100.0)).ToArbitrary();

    private static bool DerivativesMatchFiniteDifferences<T>(T p, double r) where T : struct, IPairPotential
    {
        double h = 1e-4 * r;
        var d = p.Derivatives(r);
        double[] fd =
        {
            FiniteDifference.First(p.Energy, r, h),
            FiniteDifference.First(x => p.Derivatives(x).First, r, h),
            FiniteDifference.First(x => p.Derivatives(x).Second, r, h),
            FiniteDifference.First(x => p.Derivatives(x).Third, r, h),
        };
        double[] analytic = { d.First, d.Second, d.Third, d.Fourth };
        // Tolerance on the n-th derivative: 1e-6 of a dimensionally consistent scale built from all derivative magnitudes,
        // S_n = Σ_k |V^(k)| r^(k−n), so a derivative passing through zero is not held to a relative test it cannot meet.
        double[] magnitudes = { Math.Abs(d.First), Math.Abs(d.Second), Math.Abs(d.Third), Math.Abs(d.Fourth) };
        bool ok = Math.Abs(d.Energy - p.Energy(r)) <= 1e-12 * Math.Max(1, Math.Abs(d.Energy))
            && Math.Abs(p.EnergyAtSquaredDistance(r * r) - p.Energy(r)) <= 1e-12 * Math.Max(1, Math.Abs(d.Energy));
        for (int n = 1; n <= 4; n++)
        {
            double scale = 0;
            for (int k = 1; k <= 4; k++)
            {
                scale += magnitudes[k - 1] * Math.Pow(r, k - n);
            }
            ok &= Math.Abs(analytic[n - 1] - fd[n - 1]) <= 1e-6 * scale;
        }
        return ok;
    }

    [Property(MaxTest = 200)]
    public Property Lennard_Jones_derivatives_match_finite_differences() => Prop.ForAll(PairParameters(), t =>
        DerivativesMatchFiniteDifferences(LennardJones.FromMinimum(Length.FromAngstroms(t.Scale), Energy.FromElectronVolts(t.Depth)), t.RelativeR * t.Scale));

    [Property(MaxTest = 200)]
    public Property Morse_derivatives_match_finite_differences() => Prop.ForAll(PairParameters(), t =>
        DerivativesMatchFiniteDifferences(new Morse(Energy.FromElectronVolts(t.Depth), 3.0 / t.Scale, Length.FromAngstroms(t.Scale)), t.RelativeR * t.Scale));

    [Property(MaxTest = 200)]
    public Property Buckingham_derivatives_match_finite_differences() => Prop.ForAll(PairParameters(), t =>
    {
        var b = new Buckingham(Energy.FromElectronVolts(1000 * t.Depth * 1e3), Length.FromAngstroms(0.1 * t.Scale), 10 * t.Depth * Math.Pow(t.Scale, 6));
        double r = Math.Max(b.DomainLower * 1.05, t.RelativeR * t.Scale);
        return DerivativesMatchFiniteDifferences(b, r);
    });

    [Fact]
    public void Function_potential_numerical_derivatives_match_the_analytic_form()
    {
        var lj = LennardJones.FromMinimum(Length.FromAngstroms(3.5), Energy.FromElectronVolts(0.012));
        var f = new FunctionPotential(lj.Energy, Length.FromAngstroms(2.5), Length.FromAngstroms(12));
        Assert.Equal(3.5, f.Well!.EquilibriumDistanceInAngstroms, 8);
        Assert.Equal(0.012, -f.Well.MinimumEnergyInElectronVolts, 12);
        var exact = lj.Derivatives(3.6);
        var numeric = f.Derivatives(3.6);
        Assert.True(FiniteDifference.RelativeError(numeric.First, exact.First, 1e-3) < 1e-6);
        Assert.True(FiniteDifference.RelativeError(numeric.Second, exact.Second, 1e-3) < 1e-5);
        Assert.True(FiniteDifference.RelativeError(numeric.Third, exact.Third, 1e-3) < 1e-3);
        Assert.True(FiniteDifference.RelativeError(numeric.Fourth, exact.Fourth, 1e-3) < 1e-2);
    }

    [Fact]
    public void Function_potential_returning_NaN_is_reported_with_the_separation()
    {
        var ex = Assert.Throws<NonFiniteEnergyException>(() =>
            new FunctionPotential(r => r > 3 ? double.NaN : 1 / r, Length.FromAngstroms(1), Length.FromAngstroms(5)));
        Assert.True(ex.Separation > 3);
        Assert.Contains("finite", ex.Message);
    }

    [Fact]
    public void Tabulated_potential_reproduces_the_function_it_was_built_from()
    {
        var lj = LennardJones.FromMinimum(Length.FromAngstroms(3.5), Energy.FromElectronVolts(0.012));
        var r = Enumerable.Range(0, 400).Select(i => 2.8 + i * 0.02).ToArray();
        var table = new TabulatedPotential(r, r.Select(lj.Energy).ToArray());
        Assert.Equal(3.5, table.Well!.EquilibriumDistanceInAngstroms, 4);
        foreach (double x in new[] { 3.0, 3.41, 3.5, 4.77, 10.0 })
        {
            Assert.True(Math.Abs(table.Energy(x) - lj.Energy(x)) < 1e-6 * 0.012 * 50, $"V at {x}");
            Assert.True(FiniteDifference.RelativeError(table.Derivatives(x).Second, lj.Derivatives(x).Second, 0.02) < 2e-3, $"V'' at {x}");
        }
        Assert.True(FiniteDifference.RelativeError(table.Derivatives(3.5).Third, lj.Derivatives(3.5).Third, 0.1) < 2e-2);
    }

    [Fact]
    public void Tabulated_potential_rejects_unsorted_duplicated_and_short_tables()
    {
        var ex1 = Assert.Throws<ArgumentException>(() => new TabulatedPotential(new[] { 1.0, 2, 2, 3, 4 }, new[] { 1.0, 0, -1, 0, 1 }));
        Assert.Equal("separationsAngstrom", ex1.ParamName);
        Assert.Contains("strictly increasing", ex1.Message);
        var ex2 = Assert.Throws<ArgumentException>(() => new TabulatedPotential(new[] { 1.0, 2, 3 }, new[] { 1.0, 0, 1 }));
        Assert.Contains("at least 5", ex2.Message);
        var ex3 = Assert.Throws<ArgumentException>(() => new TabulatedPotential(new[] { 1.0, 2, 3, 4, 5 }, new[] { 1.0, 0, 1 }));
        Assert.Equal("energiesElectronVolt", ex3.ParamName);
        var ex4 = Assert.Throws<ArgumentOutOfRangeException>(() => new TabulatedPotential(new[] { 1.0, 2, 3, 4, 5 }, new[] { 1.0, 0, double.NaN, 0, 1 }));
        Assert.Equal("energiesElectronVolt[2]", ex4.ParamName);
    }

    [Fact]
    public void Cut_off_wrappers_truncate_and_shift()
    {
        var cut = new CutOffPotential<LennardJones>(Argon, Length.FromAngstroms(8.5));
        var shifted = new ShiftedCutOffPotential<LennardJones>(Argon, Length.FromAngstroms(8.5));
        Assert.Equal(Argon.Energy(5), cut.Energy(5));
        Assert.Equal(0.0, cut.Energy(9));
        Assert.Equal(Argon.Energy(5) - Argon.Energy(8.5), shifted.Energy(5), 15);
        Assert.Equal(0.0, shifted.Energy(8.5 - 1e-12), 12);
        Assert.Equal(Argon.Well!.EquilibriumDistanceInAngstroms, shifted.Well!.EquilibriumDistanceInAngstroms);
        Assert.Equal(Argon.Well.WellDepthInElectronVolts + Argon.Energy(8.5), shifted.Well.WellDepthInElectronVolts, 15);
    }

    [Fact]
    public void Sum_of_potentials_adds_energies_and_derivatives_and_finds_the_joint_well()
    {
        var sum = new SumPotential<LennardJones, Morse>(Argon, Copper);
        var d = sum.Derivatives(3.3);
        Assert.Equal(Argon.Energy(3.3) + Copper.Energy(3.3), sum.Energy(3.3), 15);
        Assert.Equal(Argon.Derivatives(3.3).Second + Copper.Derivatives(3.3).Second, d.Second, 14);
        Assert.True(Math.Abs(sum.Derivatives(sum.Well!.EquilibriumDistanceInAngstroms).First) < 1e-9);
        var same = new SumPotential<HarmonicBond, HarmonicBond>(new HarmonicBond(1, Length.FromAngstroms(2)), new HarmonicBond(3, Length.FromAngstroms(3)));
        Assert.Equal((1 * 2 + 3 * 3) / 4.0, same.Well!.EquilibriumDistanceInAngstroms, 9); // minimum of two springs: weighted mean
    }

    [Fact]
    public void Lorentz_Berthelot_mixing_averages_sigma_and_takes_geometric_mean_of_epsilon()
    {
        // Source: Sources.LorentzBerthelot; Ne and Kr parameters from the noble-gas table (memory, illustrative only).
        var ne = LennardJones.FromSigmaEpsilon(Length.FromAngstroms(2.74), Energy.FromKelvin(36.2));
        var kr = LennardJones.FromSigmaEpsilon(Length.FromAngstroms(3.65), Energy.FromKelvin(163));
        var mixed = MixingRules.LorentzBerthelot(ne, kr);
        Assert.Equal((2.74 + 3.65) / 2, mixed.SigmaInAngstroms, 12);
        Assert.Equal(Math.Sqrt(36.2 * 163), Energy.FromElectronVolts(mixed.EpsilonInElectronVolts).InKelvin, 9);
    }

    [Theory]
    [InlineData(0.0, 1.0, "sigma")]
    [InlineData(-3.0, 1.0, "sigma")]
    [InlineData(3.0, 0.0, "epsilon")]
    [InlineData(3.0, -0.01, "epsilon")]
    public void Lennard_Jones_rejects_bad_parameters(double sigma, double epsilon, string parameter)
    {
        var ex = Assert.Throws<ArgumentOutOfRangeException>(() =>
            LennardJones.FromSigmaEpsilon(Length.FromAngstroms(sigma), Energy.FromElectronVolts(epsilon)));
        Assert.Equal(parameter, ex.ParamName);
        Assert.Contains("greater than 0", ex.Message);
    }

    [Fact]
    public void Non_finite_lengths_are_rejected_before_they_reach_a_potential()
        => Assert.Equal("angstroms", Assert.Throws<ArgumentOutOfRangeException>(() => Length.FromAngstroms(double.NaN)).ParamName);

    [Fact]
    public void Morse_rejects_non_positive_width()
        => Assert.Equal("widthPerAngstrom", Assert.Throws<ArgumentOutOfRangeException>(() => new Morse(Energy.FromElectronVolts(1), -1, Length.FromAngstroms(2))).ParamName);
}
