// A user's CI checks for an invented fitted pair potential (illustrative, not data): the fit must keep its minimum
// where the reference puts it, have consistent derivatives, and sample to the exact answer.
using ThermalSampling;
using ThermalSampling.Analysis;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Sampling;
using ThermalSampling.Testing;
using ThermalSampling.Units;
using Xunit;

public class MyPotentialTests
{
    private static readonly Morse Fit = new(Energy.FromElectronVolts(0.35), 1.36, Length.FromAngstroms(2.87));

    [Fact]
    public void Fit_keeps_the_reference_minimum() => StatisticalAssert.HasMinimumAt(Fit, 2.87, 0.35, 1e-6, 1e-9);

    [Fact]
    public void Fit_derivatives_are_consistent() => StatisticalAssert.DerivativesMatchFiniteDifferences(Fit, 2.3, 5.0);

    [Fact]
    public void Sampled_mean_agrees_with_the_exact_quadrature()
    {
        var line = PairLandscape.Line(Fit, Length.FromAngstroms(2.2), Length.FromAngstroms(4.5));
        var t = Temperature.FromKelvin(300);
        var report = PairSampler.Run(line, Mass.FromAtomicMassUnits(63.5), t, new SamplingSettings { Seed = 1, SamplesPerChain = 20_000, BurnIn = 2_000 });
        StatisticalAssert.AgreesWithin(report.Mean, ExactPairDistribution.Compute(line, t).MeanInAngstroms, k: 4, what: "mean separation");
    }
}
