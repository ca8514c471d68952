using System;
using System.Linq;
using FsCheck;
using FsCheck.Fluent;
using FsCheck.Xunit;
using MathNet.Numerics.Distributions;
using ThermalSampling.Analysis;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Randomness;
using ThermalSampling.Reports;
using ThermalSampling.Testing;
using ThermalSampling.Units;
using Xunit;

namespace ThermalSampling.Tests;

/// <summary>The ThermalSampling.Testing package: its assertions must pass on correct input and fail on wrong input.</summary>
public class TestingPackageTests
{
    [Fact]
    public void False_alarm_rate_is_the_two_sided_normal_tail()
    {
        // 2(1 − Φ(k)) from MathNet's Normal, an independent implementation of the same quantity.
        foreach (double k in new[] { 2.0, 3, 4, 5 })
        {
            Assert.Equal(2 * (1 - Normal.CDF(0, 1, k)), StatisticalAssert.FalseAlarmRate(k), 12);
        }
        Assert.Equal(6.334e-5, StatisticalAssert.FalseAlarmRate(4), 7);
    }

    [Fact]
    public void Agreement_checks_pass_inside_and_fail_outside_k_standard_errors()
    {
        StatisticalAssert.AgreesWithin(new Estimate(1.0, 0.1), 1.35);
        var ex = Assert.Throws<StatisticalAssertionException>(() => StatisticalAssert.AgreesWithin(new Estimate(1.0, 0.1), 1.45, 4, "mean"));
        Assert.Contains("mean", ex.Message);
        Assert.Contains("4.5 standard errors", ex.Message);
        StatisticalAssert.RunsAgree(new Estimate(1.0, 0.1), new Estimate(1.5, 0.1));
        Assert.Throws<StatisticalAssertionException>(() => StatisticalAssert.RunsAgree(new Estimate(1.0, 0.1), new Estimate(1.6, 0.1)));
        Assert.Equal("k", Assert.Throws<ArgumentOutOfRangeException>(() => StatisticalAssert.AgreesWithin(new Estimate(1, 1), 1, 0)).ParamName);
    }

    [Fact]
    public void Kolmogorov_survival_matches_the_tabulated_critical_values()
    {
        // Critical values of the Kolmogorov distribution: 1.358 at 5%, 1.628 at 1%, 1.949 at 0.1% (recalled from memory; 3-digit tables).
        Assert.Equal(0.05, StatisticalAssert.KolmogorovSurvival(1.358), 3);
        Assert.Equal(0.01, StatisticalAssert.KolmogorovSurvival(1.628), 3);
        Assert.Equal(0.001, StatisticalAssert.KolmogorovSurvival(1.949), 4);
    }

    [Fact]
    public void Kolmogorov_Smirnov_passes_for_the_right_distribution_and_fails_for_a_shifted_one()
    {
        var random = RandomStream.FromSeed(4);
        var draws = Enumerable.Range(0, 5000).Select(_ => random.NextStandardNormal()).ToArray();
        double p = StatisticalAssert.PassesKolmogorovSmirnov(draws, x => Normal.CDF(0, 1, x));
        Assert.InRange(p, 1e-3, 1);
        Assert.Throws<StatisticalAssertionException>(() => StatisticalAssert.PassesKolmogorovSmirnov(draws, x => Normal.CDF(0.1, 1, x)));
        Assert.Throws<ArgumentException>(() => StatisticalAssert.PassesKolmogorovSmirnov(draws.Take(10).ToArray(), x => x));
    }

    [Fact]
    public void Derivative_check_passes_for_analytic_forms_and_catches_a_wrong_derivative()
    {
        var lj = LennardJones.FromMinimum(Length.FromAngstroms(3.5), Energy.FromElectronVolts(0.012));
        StatisticalAssert.DerivativesMatchFiniteDifferences(lj, 3.0, 8.0);
        StatisticalAssert.DerivativesMatchFiniteDifferences(new Morse(Energy.FromElectronVolts(0.3), 1.4, Length.FromAngstroms(2.9)), 2.2, 6.0);
        var broken = new FunctionPotential(lj.Energy, Length.FromAngstroms(2.5), Length.FromAngstroms(10),
            r => lj.Derivatives(r) with { Second = 1.01 * lj.Derivatives(r).Second }, "a fit with a wrong second derivative");
        var ex = Assert.Throws<StatisticalAssertionException>(() => StatisticalAssert.DerivativesMatchFiniteDifferences(broken, 3.0, 8.0));
        Assert.Contains("derivative 2", ex.Message);
    }

    [Fact]
    public void Fitted_minimum_check_accepts_a_good_table_and_rejects_a_shifted_expectation()
    {
        var lj = LennardJones.FromMinimum(Length.FromAngstroms(3.5), Energy.FromElectronVolts(0.012));
        var r = Enumerable.Range(0, 300).Select(i => 3.0 + i * 0.02).ToArray();
        var table = new TabulatedPotential(r, r.Select(lj.Energy).ToArray());
        StatisticalAssert.HasMinimumAt(table, 3.5, 0.012, 1e-3, 1e-6);
        Assert.Throws<StatisticalAssertionException>(() => StatisticalAssert.HasMinimumAt(table, 3.55, 0.012, 1e-3, 1e-6));
    }

    [Property(MaxTest = 40)]
    public Property Generated_landscapes_hold_their_minimum_and_give_finite_references() => Prop.ForAll(
        ThermalGenerators.MorseLineArbitrary(), ThermalGenerators.TemperatureArbitrary(), (landscape, t) =>
        {
            var exact = ExactPairDistribution.Compute(landscape, t);
            var first = PairAnalysis.FirstOrder(landscape, t);
            return landscape.Contains(landscape.Potential.Well!.EquilibriumDistanceInAngstroms)
                && double.IsFinite(exact.MeanInAngstroms) && exact.VarianceInAngstromsSquared > 0
                && double.IsFinite(first.MeanShiftInAngstroms) && first.MeanShiftInAngstroms > 0; // Morse: 3kT/(4Da) > 0
        });

    [Property(MaxTest = 40)]
    public Property Hostile_values_are_refused_by_every_positive_parameter() => Prop.ForAll(ThermalGenerators.HostileValues().ToArbitrary(), v =>
        Throws(() => Temperature.FromKelvin(v)) && Throws(() => Mass.FromAtomicMassUnits(v))
        && Throws(() => new Morse(Energy.FromElectronVolts(double.IsFinite(v) ? v : 1), double.IsFinite(v) ? 1 : v, Length.FromAngstroms(2))));

    private static bool Throws(Action action)
    {
        try
        {
            action();
            return false;
        }
        catch (ArgumentException)
        {
            return true;
        }
    }
}
