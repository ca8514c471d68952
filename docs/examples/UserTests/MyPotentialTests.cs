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
    private static readonly Morse Fit = new(Energy.FromElectronVolts(0.40), 1.6, Length.FromAngstroms(2.6));

    [Fact]
    public void Fit_keeps_the_reference_minimum() => StatisticalAssert.HasMinimumAt(Fit, 2.6, 0.40, 1e-6, 1e-9);

    [Fact]
    public void Fit_derivatives_are_consistent() => StatisticalAssert.DerivativesMatchFiniteDifferences(Fit, 2.1, 5.0);

    [Fact]
    public void Sampled_mean_agrees_with_the_exact_quadrature()
    {
        var line = PairLandscape.Line(Fit, Length.FromAngstroms(2.0), Length.FromAngstroms(4.2));
        var t = Temperature.FromKelvin(300);
        var report = PairSampler.Run(line, Mass.FromAtomicMassUnits(60), t, new SamplingSettings { Seed = 1, SamplesPerChain = 20_000, BurnIn = 2_000 });
        StatisticalAssert.AgreesWithin(report.Mean, ExactPairDistribution.Compute(line, t).MeanInAngstroms, k: 4, what: "mean separation");
    }
}
