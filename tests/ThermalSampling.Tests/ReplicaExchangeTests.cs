using System;
using System.Collections.Generic;
using System.Collections.Immutable;
using System.Linq;
using MathNet.Numerics.Distributions;
using MathNet.Numerics.Integration;
using ThermalSampling.Analysis;
using ThermalSampling.Landscapes;
using ThermalSampling.Persistence;
using ThermalSampling.Potentials;
using ThermalSampling.Reports;
using ThermalSampling.Sampling;
using ThermalSampling.Units;
using Xunit;

namespace ThermalSampling.Tests;

/// <summary>Replica exchange (parallel tempering) on the lane engine: the ladder, its swaps, its bits and its answers.</summary>
public class ReplicaExchangeTests
{
    // Invented tilted double well V = h[u² − 1]² + t·u, u = (r − 3 Å)/0.5 Å, h = 0.18 eV, t = 0.005 eV, on a line from 2 to
    // 4 Å: the left well is 0.01 eV deeper (populations about 3:1 at 100 K), and the barrier is 20 to 21 kT at 100 K
    // (0.175 eV from the upper well, 0.185 eV from the lower), about 2 kT at 1000 K.
    private const double H = 0.18, Tilt = 0.005;

    private static readonly FunctionPotential DoubleWell = new(r =>
        {
            double u = (r - 3) / 0.5, s = u * u - 1;
            return H * s * s + Tilt * u;
        }, Length.FromAngstroms(1.5), Length.FromAngstroms(4.5),
        r =>
        {
            double u = (r - 3) / 0.5, s = u * u - 1;
            return new PairDerivatives(H * s * s + Tilt * u, (H * 4 * u * s + Tilt) / 0.5, H * (12 * u * u - 4) / 0.25, H * 24 * u / 0.125, H * 24 / 0.0625);
        }, "invented tilted double well");

    private static readonly PairLandscape<FunctionPotential> Wells = PairLandscape.Line(DoubleWell, Length.FromAngstroms(2.0), Length.FromAngstroms(4.0));

    private static readonly Mass Heavy = Mass.FromAtomicMassUnits(100);

    /// <summary>The share of exp(−V/kT) on [2, 3] Å by Gauss–Legendre quadrature (MathNet), independent of the library's exact distribution.</summary>
    private static double LeftShare(double kelvin)
    {
        double kT = Temperature.FromKelvin(kelvin).ThermalEnergyInElectronVolts;
        double Weight(double r) => Math.Exp(-(DoubleWell.Energy(r) + H) / kT);
        double left = GaussLegendreRule.Integrate(Weight, 2, 3, 256), right = GaussLegendreRule.Integrate(Weight, 3, 4, 256);
        return left / (left + right);
    }

    private static double HistogramShareBelow(Histogram histogram, double edge)
        => Enumerable.Range(0, histogram.Density.Length).Where(i => histogram.BinCentre(i) < edge).Sum(i => histogram.Density[i] * histogram.BinWidth);

    [Fact]
    public void A_double_well_that_traps_plain_Metropolis_gets_its_exact_populations_from_a_ladder()
    {
        // A line's energy fluctuates little (a heat capacity of k/2), so even 100 K and 1000 K swap in 30 % of attempts;
        // a target of 0.6 asks for rungs between them.
        var ladder = TemperatureLadders.ForPair(Wells, [Temperature.FromKelvin(100), Temperature.FromKelvin(1000)], 0.6);
        Assert.Equal("exact", ladder.Basis);
        Assert.True(ladder.Temperatures.Length >= 3, $"{ladder.Temperatures.Length} rungs");
        Assert.All(ladder.PredictedSwapAcceptance, a => Assert.True(a >= 0.6, $"predicted {a}"));

        // Plain Metropolis at 100 K: each chain stays in the well it starts in.
        var plainSettings = new SamplingSettings { Seed = 11, Chains = 4, SamplesPerChain = 40_000, BurnIn = 4_000 };
        var plain = PairSampler.Run(Wells, Heavy, Temperature.FromKelvin(100), plainSettings);
        Assert.True(plain.Diagnostics.RHat > 1.1, $"plain R-hat {plain.Diagnostics.RHat}");
        Assert.Contains(plain.Warnings, w => w.Code == WarningCodes.RHatHigh);

        // The ladder: the same chains per rung, swapping every 20 steps.
        var reports = PairSampler.Sweep(Wells, Heavy, ladder.Temperatures, plainSettings with { SwapInterval = 20 });
        var cold = reports[0];
        Assert.Equal(100, cold.Temperature.InKelvin);
        Assert.True(cold.Diagnostics.RHat < 1.05, $"ladder R-hat {cold.Diagnostics.RHat}");
        Assert.DoesNotContain(cold.Warnings, w => w.Code == WarningCodes.RHatHigh);
        // The mean against the exact quadrature, within 4 standard errors; the left well's share against an independent quadrature.
        Assert.True(Math.Abs(cold.Mean.Value - cold.Exact.Mean) < 4 * cold.Mean.StandardError,
            $"mean {cold.Mean.Value} ± {cold.Mean.StandardError}, exact {cold.Exact.Mean}");
        double share = HistogramShareBelow(cold.Histogram, 3.0), exactShare = LeftShare(100);
        Assert.InRange(exactShare, 0.7, 0.85);
        double shareError = Math.Sqrt(exactShare * (1 - exactShare) / cold.Diagnostics.EffectiveSampleSize);
        Assert.True(Math.Abs(share - exactShare) < 4 * shareError, $"left share {share}, exact {exactShare} (± {shareError})");
        // Every rung against its exact mean, and every measured swap acceptance in the band about its prediction.
        for (int k = 0; k < reports.Length; k++)
        {
            var r = reports[k];
            Assert.True(Math.Abs(r.Mean.Value - r.Exact.Mean) < 4 * r.Mean.StandardError, $"rung {k}: {r.Mean.Value} ± {r.Mean.StandardError} vs {r.Exact.Mean}");
            var swaps = r.Diagnostics.ReplicaExchange!;
            Assert.Equal(k, swaps.Rung);
            Assert.Equal(ladder.Temperatures.Select(t => t.InKelvin), swaps.LadderInKelvin);
            if (k == reports.Length - 1)
            {
                Assert.Null(swaps.SwapAcceptance);
                continue;
            }
            double measured = swaps.SwapAcceptance!.Value, predicted = ladder.PredictedSwapAcceptance[k];
            Assert.True(measured >= 0.6 - 0.05 && Math.Abs(measured - predicted) < 0.05, $"rung {k}: swap acceptance {measured}, predicted {predicted}");
        }
        Assert.True(cold.Diagnostics.ReplicaExchange!.RoundTrips > 20, $"{cold.Diagnostics.ReplicaExchange.RoundTrips} round trips");
        Assert.DoesNotContain(cold.Warnings, w => w.Code == WarningCodes.LadderNoRoundTrips || w.Code == WarningCodes.SwapAcceptanceLow);
    }

    [Theory]
    [InlineData(0.5, 1.3)]
    [InlineData(0.5, 2.0)]
    [InlineData(1.5, 1.3)]
    [InlineData(1.5, 1.8)]
    public void The_predicted_swap_acceptance_matches_draws_of_a_harmonic_wells_energy(double shape, double ratio)
    {
        // A harmonic well's potential energy is Gamma(d/2, kT) distributed (d = 1 for a line, 3 for a site): draw both
        // rungs' energies with MathNet's Gamma sampler and average min(1, e^((β₁ − β₂)(E₁ − E₂))).
        double cold = 50, hot = cold * ratio;
        double kT1 = Temperature.FromKelvin(cold).ThermalEnergyInElectronVolts, kT2 = Temperature.FromKelvin(hot).ThermalEnergyInElectronVolts;
        var random = new Random(7); // test-side reference draws only
        var g1 = new Gamma(shape, 1 / kT1, random);
        var g2 = new Gamma(shape, 1 / kT2, random);
        const int draws = 400_000;
        double sum = 0, sum2 = 0;
        for (int i = 0; i < draws; i++)
        {
            double a = Math.Min(1, Math.Exp((1 / kT1 - 1 / kT2) * (g1.Sample() - g2.Sample())));
            sum += a;
            sum2 += a * a;
        }
        double mean = sum / draws, se = Math.Sqrt((sum2 / draws - mean * mean) / draws);
        double predicted;
        if (shape == 0.5)
        {
            // A line harmonic bond between walls far out: Gamma(1/2).
            var bond = PairLandscape.Line(new HarmonicBond(10.0, Length.FromAngstroms(2.0)), Length.FromAngstroms(1.5), Length.FromAngstroms(2.5));
            var plan = TemperatureLadders.ForPair(bond, [Temperature.FromKelvin(cold), Temperature.FromKelvin(hot)], 0.01);
            predicted = plan.PredictedSwapAcceptance[0];
        }
        else
        {
            var plan = TemperatureLadders.ForSite(InventedLandscapes.Cage, [Temperature.FromKelvin(cold), Temperature.FromKelvin(hot)], 0.01);
            Assert.Equal("harmonic", plan.Basis);
            predicted = plan.PredictedSwapAcceptance[0];
        }
        Assert.True(Math.Abs(predicted - mean) < 4 * se + 1e-3, $"predicted {predicted}, drawn {mean} ± {se}");
    }

    [Fact]
    public void An_automatic_ladder_keeps_the_given_temperatures_and_adds_geometric_rungs_between_them()
    {
        var plan = TemperatureLadders.ForPair(Wells, [Temperature.FromKelvin(400), Temperature.FromKelvin(100), Temperature.FromKelvin(200)], 0.5);
        var kelvin = plan.Temperatures.Select(t => t.InKelvin).ToArray();
        Assert.Equal(kelvin.Order(), kelvin);
        Assert.Contains(100.0, kelvin);
        Assert.Contains(200.0, kelvin);
        Assert.Contains(400.0, kelvin);
        Assert.Equal(kelvin.Select(k => k is not (100 or 200 or 400)), plan.Added);
        Assert.Equal(kelvin.Length - 1, plan.PredictedSwapAcceptance.Length);
        Assert.All(plan.PredictedSwapAcceptance, a => Assert.InRange(a, 0.5, 1));
        // A higher target needs more rungs.
        Assert.True(TemperatureLadders.ForPair(Wells, [Temperature.FromKelvin(100), Temperature.FromKelvin(400)], 0.8).Temperatures.Length > kelvin.Length);
        var ex = Assert.Throws<ArgumentOutOfRangeException>(() => TemperatureLadders.ForPair(Wells, [Temperature.FromKelvin(100), Temperature.FromKelvin(400)], 1.0));
        Assert.Equal("targetSwapAcceptance", ex.ParamName);
        Assert.Contains("at least two", Assert.Throws<ArgumentException>(() => TemperatureLadders.ForPair(Wells, [Temperature.FromKelvin(100)])).Message);
    }

    private static SamplingSettings Small(int? threads, int? lanes) => new()
    {
        Seed = 23, Chains = 5, SamplesPerChain = 3 * 4096 + 77, BurnIn = 1000, SwapInterval = 37, MaxThreads = threads, ChainsPerVector = lanes,
        RetainedDrawsPerChain = 50,
    };

    private static readonly ImmutableArray<Temperature> ThreeRungs = [Temperature.FromKelvin(300), Temperature.FromKelvin(450), Temperature.FromKelvin(700)];

    /// <summary>Every number of a ladder's reports that depends on the draws, bit for bit.</summary>
    private static IEnumerable<double> Numbers(IEnumerable<PairVibrationReport> reports)
        => reports.SelectMany(r => new[]
            {
                r.Mean.Value, r.Mean.StandardError, r.Variance.Value, r.Variance.StandardError, r.FourthCumulant.Value, r.PotentialEnergy.Value,
                r.Diagnostics.RHat ?? -1, r.Diagnostics.EffectiveSampleSize, r.Diagnostics.AcceptanceRate ?? -1, r.Diagnostics.FinalStepWidthInAngstroms ?? -1,
                r.Diagnostics.ReplicaExchange!.SwapAcceptance ?? -1, r.Diagnostics.ReplicaExchange.RoundTrips, r.Diagnostics.ReplicaExchange.MeanRoundTripSteps ?? -1,
            }.Concat(r.Histogram.Density).Concat(r.Draws.Chains.SelectMany(c => c)));

    [Fact]
    public void A_ladder_is_the_same_bits_at_any_thread_count_and_lane_width()
    {
        var reference = Numbers(PairSampler.Sweep(Wells, Heavy, ThreeRungs, Small(1, 1))).ToArray();
        foreach (var (threads, lanes) in new (int?, int?)[] { (2, 1), (1, 2), (2, 4), (3, 8), (null, null) })
        {
            Assert.Equal(reference, Numbers(PairSampler.Sweep(Wells, Heavy, ThreeRungs, Small(threads, lanes))).ToArray());
        }
    }

    [Fact]
    public void A_site_ladder_is_the_same_bits_at_any_lane_width_and_its_rungs_report_their_swaps()
    {
        var settings = new SamplingSettings { Seed = 3, Chains = 3, SamplesPerChain = 4096, BurnIn = 500, SwapInterval = 50, MaxThreads = 1, ChainsPerVector = 1 };
        ImmutableArray<Temperature> temperatures = [Temperature.FromKelvin(20), Temperature.FromKelvin(30), Temperature.FromKelvin(45)];
        var one = SiteSampler.Sweep(InventedLandscapes.Cage, Heavy, temperatures, settings);
        var four = SiteSampler.Sweep(InventedLandscapes.Cage, Heavy, temperatures, settings with { ChainsPerVector = 4, MaxThreads = 2 });
        static IEnumerable<double> SiteNumbers(IEnumerable<SiteVibrationReport> reports) => reports.SelectMany(r => new[]
        {
            r.Mean.X, r.Mean.Z, r.MeanSquareDisplacement.Value, r.MeanSquareDisplacement.StandardError, r.Diagnostics.RHat ?? -1,
            r.Diagnostics.ReplicaExchange!.SwapAcceptance ?? -1, r.Diagnostics.ReplicaExchange.RoundTrips,
        });
        Assert.Equal(SiteNumbers(one), SiteNumbers(four));
        Assert.All(one.Take(2), r => Assert.InRange(r.Diagnostics.ReplicaExchange!.SwapAcceptance!.Value, 0.05, 1));
        Assert.Null(one[2].Diagnostics.ReplicaExchange!.SwapAcceptance);
        Assert.Equal(0, one[2].Diagnostics.ReplicaExchange!.SwapAttempts);
        // Each rung's spread is its own temperature's: it grows with T.
        Assert.True(one[0].MeanSquareDisplacement.Value < one[1].MeanSquareDisplacement.Value && one[1].MeanSquareDisplacement.Value < one[2].MeanSquareDisplacement.Value);
    }

    [Fact]
    public void Round_trips_of_a_ladder_whose_swaps_always_succeed_take_four_swap_intervals()
    {
        // Two rungs 10⁻⁴ K apart: every swap is accepted (the ratio differs from 1 by about 10⁻⁶ of the energy in kT).
        // Pairs are offered at every second swap point (even–odd), so a configuration goes up at one and down at the next.
        var settings = new SamplingSettings { Seed = 1, Chains = 2, SamplesPerChain = 10_000, BurnIn = 0, SwapInterval = 25, MaxThreads = 1 };
        var reports = PairSampler.Sweep(Wells, Heavy, [Temperature.FromKelvin(600), Temperature.FromKelvin(600.0001)], settings);
        var swaps = reports[0].Diagnostics.ReplicaExchange!;
        Assert.Equal(1.0, swaps.SwapAcceptance);
        Assert.Equal(2 * (10_000 / 25 / 2), swaps.SwapAttempts + 2); // swap points 50, 100, … 9950 of both sets; the one at step 10 000 is not made
        Assert.Equal(4.0 * 25, swaps.MeanRoundTripSteps);
        Assert.True(swaps.RoundTrips >= 2 * (10_000 / 100 - 1), $"{swaps.RoundTrips} round trips");
        Assert.Equal(25, swaps.SwapInterval);
    }

    [Fact]
    public void A_ladder_resumed_from_any_of_its_checkpoints_gives_the_uninterrupted_bits()
    {
        var settings = Small(2, 2);
        var whole = Numbers(PairSampler.Sweep(Wells, Heavy, ThreeRungs, settings)).ToArray();
        var saved = new List<SamplingCheckpoint>();
        var checkpointed = PairSampler.SweepWithCheckpoints(Wells, Heavy, ThreeRungs, settings, new CheckpointOptions(TimeSpan.Zero, saved.Add));
        Assert.Equal(whole, Numbers(checkpointed).ToArray());
        Assert.True(saved.Count >= 3, $"{saved.Count} checkpoints");
        foreach (var checkpoint in new[] { saved[0], saved[saved.Count / 2], saved[^1] })
        {
            var bytes = new System.IO.MemoryStream();
            checkpoint.WriteTo(bytes);
            bytes.Position = 0;
            var read = SamplingCheckpoint.ReadFrom(bytes);
            Assert.Equal(whole, Numbers(PairSampler.Resume(Wells, Heavy, ThreeRungs, settings with { MaxThreads = 1 }, read)).ToArray());
        }
    }

    [Fact]
    public void A_cancelled_ladder_writes_a_checkpoint_that_finishes_it()
    {
        var settings = Small(1, 1) with { SamplesPerChain = 20 * 4096 };
        var whole = Numbers(PairSampler.Sweep(Wells, Heavy, ThreeRungs, settings)).ToArray();
        using var cts = new System.Threading.CancellationTokenSource();
        var saved = new List<SamplingCheckpoint>();
        var progress = new SynchronousProgress(p =>
        {
            if (p.ChainStepsDone > 5 * 4096)
            {
                cts.Cancel();
            }
        });
        Assert.ThrowsAny<OperationCanceledException>(() => PairSampler.SweepWithCheckpoints(Wells, Heavy, ThreeRungs, settings,
            new CheckpointOptions(TimeSpan.FromHours(1), saved.Add), progress, cts.Token));
        Assert.True(saved.Count >= 2, $"{saved.Count} checkpoints"); // the first, at once, and the one written on cancellation
        Assert.True(saved[^1].ChainStepsDone > 0 && saved[^1].ChainStepsDone < saved[^1].ChainStepsTotal);
        Assert.Equal(whole, Numbers(PairSampler.Resume(Wells, Heavy, ThreeRungs, settings, saved[^1])).ToArray());
    }

    private sealed class SynchronousProgress(Action<SamplingProgress> report) : IProgress<SamplingProgress>
    {
        public void Report(SamplingProgress value) => report(value);
    }

    [Fact]
    public void Replica_exchange_is_refused_where_it_cannot_run_naming_what_is_wrong()
    {
        var settings = new SamplingSettings { Seed = 1, SwapInterval = 10 };
        var one = Assert.Throws<ArgumentException>(() => PairSampler.Run(Wells, Heavy, Temperature.FromKelvin(100), settings));
        Assert.Equal("settings", one.ParamName);
        Assert.Contains("SwapInterval = 10 asks for replica exchange", one.Message);
        Assert.Throws<ArgumentException>(() => PairSampler.Sample(Wells, Temperature.FromKelvin(100), settings));
        Assert.Throws<ArgumentException>(() => SiteSampler.Run(InventedLandscapes.Cage, Heavy, Temperature.FromKelvin(10), settings));
        Assert.Contains("at least two temperatures; temperatures has 1",
            Assert.Throws<ArgumentException>(() => PairSampler.Sweep(Wells, Heavy, [Temperature.FromKelvin(100)], settings)).Message);
        Assert.Contains("temperatures[1] = 100 K follows 200 K",
            Assert.Throws<ArgumentException>(() => PairSampler.Sweep(Wells, Heavy, [Temperature.FromKelvin(200), Temperature.FromKelvin(100)], settings)).Message);
        Assert.Contains("SwapInterval = 10 is out of range; valid: null, or 1 to 10^6 with the Metropolis method",
            Assert.Throws<ArgumentException>(() => (settings with { Method = SamplingMethod.Direct }).Validate()).Message);
        Assert.Contains("SwapInterval = 0 is out of range",
            Assert.Throws<ArgumentException>(() => (settings with { SwapInterval = 0 }).Validate()).Message);
    }

    [Fact]
    public void A_sparse_ladder_is_warned_about()
    {
        // The invented cage at 1 K and 300 K alone: a harmonic well's swap acceptance between them is predicted far below 5 %,
        // and in 2000 recorded steps no configuration makes the round trip.
        ImmutableArray<Temperature> temperatures = [Temperature.FromKelvin(1), Temperature.FromKelvin(300)];
        Assert.True(TemperatureLadders.ForSite(InventedLandscapes.Cage, temperatures, 1e-9).PredictedSwapAcceptance[0] < 0.01);
        var settings = new SamplingSettings { Seed = 4, Chains = 2, SamplesPerChain = 2000, BurnIn = 500, SwapInterval = 10 };
        var reports = SiteSampler.Sweep(InventedLandscapes.Cage, Heavy, temperatures, settings);
        Assert.True(reports[0].Diagnostics.ReplicaExchange!.SwapAcceptance < 0.05);
        Assert.Contains(reports[0].Warnings, w => w.Code == WarningCodes.SwapAcceptanceLow && w.Message.Contains("1 K and 300 K", StringComparison.Ordinal));
        Assert.DoesNotContain(reports[1].Warnings, w => w.Code == WarningCodes.SwapAcceptanceLow); // the top rung has no step up
        Assert.Equal(0, reports[1].Diagnostics.ReplicaExchange!.RoundTrips);
        Assert.Contains(reports[1].Warnings, w => w.Code == WarningCodes.LadderNoRoundTrips);
    }
}
