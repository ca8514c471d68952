using System;
using System.Linq;
using ThermalSampling.Analysis;
using ThermalSampling.Statistics;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Sampling;
using ThermalSampling.Units;
using Xunit;

namespace ThermalSampling.Tests;

/// <summary>Error-bar calibration and convergence diagnostics (statistical tier: fixed seeds, tolerances from the binomial error).</summary>
public class CalibrationTests
{
    private static readonly Morse Iron = new(Energy.FromElectronVolts(0.4174), 1.3885, Length.FromAngstroms(2.845)); // Sources.GirifalcoWeizer

    [Theory]
    [InlineData(SamplingMethod.Metropolis)]
    [InlineData(SamplingMethod.Direct)]
    public void Ninety_five_percent_intervals_cover_the_exact_mean_in_95_percent_of_runs(SamplingMethod method)
    {
        // 400 independent seeded runs; the binomial standard deviation of the coverage is 1.1%, so 95% ± 3% is a 2.7σ band.
        var landscape = PairLandscape.Radial(Iron, Length.FromAngstroms(2.0), Length.FromAngstroms(5.0));
        var t = Temperature.FromKelvin(600);
        double exact = ExactPairDistribution.Compute(landscape, t).MeanInAngstroms;
        const int runs = 400;
        int covered = 0;
        for (int run = 0; run < runs; run++)
        {
            var settings = new SamplingSettings { Seed = (ulong)(1000 + run), Method = method, Chains = 4, SamplesPerChain = 4_000, BurnIn = 1_000 };
            var report = PairSampler.Run(landscape, Mass.FromAtomicMassUnits(55.845), t, settings);
            if (Math.Abs(report.Mean.Value - exact) <= 1.96 * report.Mean.StandardError)
            {
                covered++;
            }
        }
        double coverage = (double)covered / runs;
        Assert.InRange(coverage, 0.92, 0.98);
    }

    [Fact]
    public void Chains_trapped_in_two_wells_give_R_hat_above_1_1_and_a_warning()
    {
        // Invented double well V = h[((r − 3)/0.5)² − 1]² with h = 1 eV: at 300 K the barrier is 39 kT, so no chain crosses.
        // Chains start at the 1st…99th percentiles of the exact (bimodal) distribution: two in each well.
        const double h = 1.0;
        var doubleWell = new FunctionPotential(r => h * Math.Pow(Math.Pow((r - 3) / 0.5, 2) - 1, 2), Length.FromAngstroms(1.5), Length.FromAngstroms(4.5),
            r =>
            {
                double u = (r - 3) / 0.5, s = u * u - 1;
                return new PairDerivatives(h * s * s, h * 2 * s * 2 * u / 0.5, h * (12 * u * u - 4) / 0.25, h * 24 * u / 0.125, h * 24 / 0.0625);
            }, "invented double well");
        var landscape = PairLandscape.Line(doubleWell, Length.FromAngstroms(2.0), Length.FromAngstroms(4.0));
        var report = PairSampler.Run(landscape, Mass.FromAtomicMassUnits(40), Temperature.FromKelvin(300),
            new SamplingSettings { Seed = 5, Chains = 4, SamplesPerChain = 20_000, BurnIn = 2_000 });
        Assert.True(report.Diagnostics.RHat > 1.1, $"R-hat {report.Diagnostics.RHat}");
        Assert.Contains(report.Warnings, w => w.Code == WarningCodes.RHatHigh);
        Assert.Contains(report.Warnings, w => w.Code == WarningCodes.DisagreesWithExact || w.Code == WarningCodes.RHatHigh);
    }

    [Fact]
    public void Well_mixed_chains_give_R_hat_below_1_01()
    {
        var landscape = PairLandscape.Line(Iron, Length.FromAngstroms(2.0), Length.FromAngstroms(5.0));
        var report = PairSampler.Run(landscape, Mass.FromAtomicMassUnits(55.845), Temperature.FromKelvin(300),
            new SamplingSettings { Seed = 9, Chains = 4, SamplesPerChain = 50_000, BurnIn = 5_000 });
        Assert.True(report.Diagnostics.RHat < RHat.Threshold, $"R-hat {report.Diagnostics.RHat}");
        Assert.DoesNotContain(report.Warnings, w => w.Code == WarningCodes.RHatHigh);
    }
}
