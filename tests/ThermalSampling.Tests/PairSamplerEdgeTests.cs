using System;
using System.Collections.Generic;
using System.Linq;
using ThermalSampling.Persistence;
using ThermalSampling.Analysis;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Reports;
using ThermalSampling.Sampling;
using ThermalSampling.Units;
using Xunit;

namespace ThermalSampling.Tests;

/// <summary>
/// Small, fast checks of the pair sampler's edges: the inverse-CDF table's ends and refusal, the fallbacks when the
/// minimum is outside the window, the "disagrees with exact" warning, argument checks of the checkpointed entry points,
/// the landscape fingerprint, the progress schedule, the start quantiles, the acceptance target, the error bars of
/// independent draws and the checkpoint's lane width. Written against the survivors of the pair mutation runs
/// (docs/validation.md).
/// </summary>
public class PairSamplerEdgeTests
{
    private static readonly Mass ArgonMass = Mass.FromAtomicMassUnits(39.948);
    private static readonly Morse Iron = new(Energy.FromElectronVolts(0.4174), 1.3885, Length.FromAngstroms(2.845)); // Sources.GirifalcoWeizer
    private static readonly PairLandscape<Morse> IronLine = PairLandscape.Line(Iron, Length.FromAngstroms(2.0), Length.FromAngstroms(5.0));

    private static SamplingSettings Small(SamplingMethod method, long samples = 4096) => new()
    {
        Seed = 11, Method = method, Chains = 2, SamplesPerChain = samples, BurnIn = 0, MaxThreads = 1,
    };

    [Fact]
    public void Inverse_cdf_table_has_the_window_at_its_ends_and_follows_the_exact_cdf_at_its_break_points()
    {
        var exact = ExactPairDistribution.Compute(IronLine, Temperature.FromKelvin(600));
        var table = InverseCdfTable.Build(exact);
        // About 16384 cells, at least four per quadrature piece (the construction documented on InverseCdfTable).
        Assert.InRange(table.CellCount, 16384, 16384 + 4 * (exact.BreakPoints.Length + 1));
        Assert.Equal(2.0, table.Quantile(0), 12);
        Assert.Equal(5.0, table.Quantile(1), 12);
        foreach (double bad in new[] { -0.1, 1.1, double.NaN })
        {
            Assert.Equal("probability", Assert.Throws<ArgumentOutOfRangeException>(() => table.Quantile(bad)).ParamName);
        }
        Assert.Equal(0, table.CumulativeProbability(1.0));
        Assert.Equal(0, table.CumulativeProbability(2.0));
        Assert.Equal(1, table.CumulativeProbability(5.0));
        Assert.Equal(1, table.CumulativeProbability(7.0));
        Assert.Equal("exact", Assert.Throws<ArgumentNullException>(() => InverseCdfTable.Build(null!)).ParamName);
        // Break points are cell edges, where the table's CDF is exact up to the quadrature's error.
        var inside = exact.BreakPoints.Where(b => b > 2.0 && b < 5.0).ToArray();
        Assert.NotEmpty(inside);
        foreach (double b in inside)
        {
            Assert.Equal(exact.CumulativeProbability(b), table.CumulativeProbability(b), 1e-9);
        }
        // Between edges: the quantile inverts the table's CDF, and both follow the exact CDF within the measured error.
        foreach (double p in new[] { 1e-4, 0.1, 0.37, 0.5, 0.9, 0.9999 })
        {
            double r = table.Quantile(p);
            Assert.Equal(p, table.CumulativeProbability(r), 1e-9);
            Assert.Equal(p, exact.CumulativeProbability(r), 4 * table.CdfInterpolationError + 1e-9);
        }
    }

    [Fact]
    public void Inverse_cdf_table_refuses_a_density_that_varies_too_fast_for_its_cells()
    {
        // Invented: a particle pressed against the window's inner edge by a constant force, V = F·(r − 1 Å), so strong
        // that its density exp(−F(r − 1)/kT) decays within 1e-7 Å, far less than one cell: a uniform density per cell
        // cannot represent it, and the table must refuse rather than sample it wrongly.
        double kt = Temperature.FromKelvin(300).ThermalEnergyInElectronVolts, force = kt / 1e-7;
        var pressed = new FunctionPotential(r => force * (r - 1), Length.FromAngstroms(0.5), Length.FromAngstroms(6.0),
            r => new PairDerivatives(force * (r - 1), force, 0, 0, 0), "invented constant force");
        var exact = ExactPairDistribution.Compute(PairLandscape.Line(pressed, Length.FromAngstroms(1.0), Length.FromAngstroms(5.0)), Temperature.FromKelvin(300));
        var ex = Assert.Throws<InvalidOperationException>(() => InverseCdfTable.Build(exact));
        Assert.Contains("Narrow the window or use Metropolis", ex.Message);
        Assert.Contains("limit 0.0001", ex.Message);
    }

    [Fact]
    public void A_window_without_the_minimum_is_sampled_with_a_warning_and_a_tenth_of_the_window_as_first_step()
    {
        // Invented: the repulsive side of the iron Morse pair only, 2.0–2.6 Å (the minimum is at 2.845 Å).
        var wall = PairLandscape.Line(Iron, Length.FromAngstroms(2.0), Length.FromAngstroms(2.6));
        var report = PairSampler.Run(wall, ArgonMass, Temperature.FromKelvin(300), Small(SamplingMethod.Metropolis));
        Assert.Contains(report.Warnings, w => w.Code == WarningCodes.MinimumOutsideWindow);
        Assert.Null(report.Harmonic);
        Assert.Null(report.MinimumInAngstroms);
        // No burn-in, so the step width is never adapted: it stays at the fallback, a tenth of the window.
        Assert.Equal(0.06, report.Diagnostics.FinalStepWidthInAngstroms!.Value, 12);
    }

    [Fact]
    public void A_chain_that_cannot_move_is_reported_as_disagreeing_with_the_exact_answer()
    {
        // One chain, no burn-in and a step of 1e-5 Å: it stays near its start (the median) and its variance is far too small.
        var settings = Small(SamplingMethod.Metropolis, samples: 8192) with { Chains = 1, InitialStepWidthInAngstroms = 1e-5 };
        var report = PairSampler.Run(IronLine, ArgonMass, Temperature.FromKelvin(600), settings);
        Assert.True(Math.Abs(report.Exact.ZScoreVariance) > 4, $"z of the variance {report.Exact.ZScoreVariance}");
        var warning = Assert.Single(report.Warnings, w => w.Code == WarningCodes.DisagreesWithExact);
        Assert.Contains("Trust the exact value", warning.Message);
        // Steps of 1e-5 Å are almost all accepted, far from the default target: that is reported too.
        Assert.True(report.Diagnostics.AcceptanceRate > 0.95, $"acceptance {report.Diagnostics.AcceptanceRate}");
        Assert.Contains(report.Warnings, w => w.Code == WarningCodes.AcceptanceOffTarget);
    }

    [Fact]
    public void Checkpointed_entry_points_check_their_arguments_before_running()
    {
        var temperatures = new[] { Temperature.FromKelvin(300) };
        var options = new CheckpointOptions(TimeSpan.FromHours(1), _ => { });
        var settings = Small(SamplingMethod.Direct);
        Assert.Equal("checkpoints", Assert.Throws<ArgumentNullException>(() =>
            PairSampler.SweepWithCheckpoints(IronLine, ArgonMass, temperatures, settings, null!)).ParamName);
        Assert.Equal("checkpoint", Assert.Throws<ArgumentNullException>(() =>
            PairSampler.Resume(IronLine, ArgonMass, temperatures, settings, null!)).ParamName);
        Assert.Equal("landscape", Assert.Throws<ArgumentNullException>(() =>
            PairSampler.SweepWithCheckpoints<Morse>(null!, ArgonMass, temperatures, settings, options)).ParamName);
        var ex = Assert.ThrowsAny<ArgumentException>(() =>
            PairSampler.SweepWithCheckpoints(IronLine, ArgonMass, temperatures, settings with { Chains = 0 }, options));
        Assert.Contains("Chains", ex.Message);
        // A bad second temperature or a bad mass is refused before the first temperature runs: nothing is checkpointed.
        var saved = new List<SamplingCheckpoint>();
        var every = new CheckpointOptions(TimeSpan.Zero, saved.Add);
        Assert.ThrowsAny<ArgumentException>(() => PairSampler.SweepWithCheckpoints(IronLine, ArgonMass, [Temperature.FromKelvin(300), default], settings, every));
        Assert.ThrowsAny<ArgumentException>(() => PairSampler.SweepWithCheckpoints(IronLine, default, temperatures, settings, every));
        Assert.Empty(saved);
    }

    [Fact]
    public void A_single_run_checks_its_arguments_before_any_work()
    {
        var t = Temperature.FromKelvin(300);
        var settings = Small(SamplingMethod.Metropolis);
        Assert.Equal("landscape", Assert.Throws<ArgumentNullException>(() => PairSampler.Run<Morse>(null!, ArgonMass, t, settings)).ParamName);
        Assert.Equal("settings", Assert.Throws<ArgumentNullException>(() => PairSampler.Run(IronLine, ArgonMass, t, null!)).ParamName);
        // Without the check, zero chains would fail deep inside with an index error instead of naming the setting.
        Assert.Contains("Chains", Assert.ThrowsAny<ArgumentException>(() => PairSampler.Run(IronLine, ArgonMass, t, settings with { Chains = 0 })).Message);
        Assert.Contains("mass", Assert.ThrowsAny<ArgumentException>(() => PairSampler.Run(IronLine, default, t, settings)).Message);
        Assert.Contains("temperature", Assert.ThrowsAny<ArgumentException>(() => PairSampler.Run(IronLine, ArgonMass, default, settings)).Message);
    }

    [Fact]
    public void Temperature_lists_must_be_non_empty_and_bounded()
    {
        var settings = Small(SamplingMethod.Direct);
        var empty = Assert.Throws<ArgumentException>(() => PairSampler.Sweep(IronLine, ArgonMass, Array.Empty<Temperature>(), settings));
        Assert.Equal("temperatures", empty.ParamName);
        Assert.Contains("empty", empty.Message);
        var many = Enumerable.Range(1, 100_001).Select(i => Temperature.FromKelvin(i));
        var tooMany = Assert.Throws<ArgumentException>(() => PairSampler.Sweep(IronLine, ArgonMass, many, settings));
        Assert.Equal("temperatures", tooMany.ParamName);
        Assert.Contains("more than 100000", tooMany.Message);
    }

    [Fact]
    public void Temperature_lists_refuse_null_and_zero_and_take_exactly_the_maximum()
    {
        var settings = Small(SamplingMethod.Direct);
        Assert.Equal("temperatures", Assert.Throws<ArgumentNullException>(() => PairSampler.Sweep(IronLine, ArgonMass, null!, settings)).ParamName);
        // default(Temperature) is 0 K, which no factory method makes.
        var zero = Assert.Throws<ArgumentOutOfRangeException>(() => PairSampler.Sweep(IronLine, ArgonMass, [Temperature.FromKelvin(300), default], settings));
        Assert.Equal("temperatures", zero.ParamName);
        Assert.Contains("greater than 0", zero.Message);
        // The limit itself is allowed (checked on the list alone: running 100 000 temperatures is not the point).
        Assert.Equal(TemperatureList.MaximumCount, TemperatureList.Check(Enumerable.Range(1, TemperatureList.MaximumCount).Select(i => Temperature.FromKelvin(i))).Count);
    }

    [Fact]
    public void A_direct_run_records_one_chain_per_vector_in_its_checkpoint()
    {
        var saved = new List<SamplingCheckpoint>();
        // The first checkpoint is written at the chains' second chunk boundary (draw 4096).
        var settings = Small(SamplingMethod.Direct, samples: 3 * 4096) with { Chains = 8, MaxThreads = 2 };
        PairSampler.SweepWithCheckpoints(IronLine, ArgonMass, Room, settings, new CheckpointOptions(TimeSpan.FromHours(1), saved.Add));
        Assert.NotEmpty(saved);
        Assert.All(saved, c => Assert.Equal(1, c.ChainsPerVector));
    }

    private static readonly Temperature[] Room = [Temperature.FromKelvin(300)];

    /// <summary>A synchronous progress sink and the list of every report it received.</summary>
    internal static (List<SamplingProgress> Seen, PairSamplerTests.SyncProgress Sink) ProgressLog()
    {
        var seen = new List<SamplingProgress>();
        return (seen, new PairSamplerTests.SyncProgress(p =>
        {
            lock (seen)
            {
                seen.Add(p);
            }
        }));
    }
    private static readonly SamplingSettings ShortDirect = Small(SamplingMethod.Direct, samples: 3 * 4096);

    /// <summary>The first checkpoint of a short direct run of <paramref name="landscape"/> at 300 K.</summary>
    private static SamplingCheckpoint FirstCheckpoint<T>(PairLandscape<T> landscape) where T : struct, IPairPotential
    {
        var saved = new List<SamplingCheckpoint>();
        PairSampler.SweepWithCheckpoints(landscape, ArgonMass, Room, ShortDirect, new CheckpointOptions(TimeSpan.FromHours(1), saved.Add));
        return saved[0];
    }

    [Theory]
    [InlineData(0)]
    [InlineData(129)]
    [InlineData(256)]
    public void The_landscape_fingerprint_sees_a_change_at_any_one_of_its_nodes(int bumpNode)
    {
        // Invented: the iron Morse pair as a delegate, and the same with a bump 0.3 node spacings wide at one of the 257
        // nodes (the window's ends included), zero at every other node. A checkpoint of one must not resume the other.
        const double lo = 2.0, hi = 5.0;
        double node = lo + (hi - lo) * bumpNode / 256, halfWidth = 0.3 * (hi - lo) / 256;
        double Bump(double r) => Math.Abs(r - node) < halfWidth ? 1e-3 * Math.Pow(1 - Math.Abs(r - node) / halfWidth, 2) : 0;
        // Both add a bump term, so both turn an underflowed −0.0 into +0.0 alike: only the bump itself differs.
        var plain = new FunctionPotential(r => Iron.Energy(r) + 0 * Bump(r), Length.FromAngstroms(1.5), Length.FromAngstroms(6.0), description: "invented delegate");
        var bumped = new FunctionPotential(r => Iron.Energy(r) + Bump(r), Length.FromAngstroms(1.5), Length.FromAngstroms(6.0), description: "invented delegate");
        var a = PairLandscape.Line(plain, Length.FromAngstroms(lo), Length.FromAngstroms(hi));
        var b = PairLandscape.Line(bumped, Length.FromAngstroms(lo), Length.FromAngstroms(hi));
        for (int i = 0; i <= 256; i++)
        {
            double r = lo + (hi - lo) * i / 256;
            Assert.True(i == bumpNode ? Bump(r) > 0 : Bump(r) == 0, $"node {i}");
        }
        var checkpoint = FirstCheckpoint(a);
        var ex = Assert.Throws<CheckpointException>(() => PairSampler.Resume(b, ArgonMass, Room, ShortDirect, checkpoint));
        Assert.Contains("differs from this run's", ex.Message);
        Assert.Contains("in its potential, window, sites or confinement", ex.Message);
        Assert.DoesNotContain("its mass is", ex.Message);
        Assert.Single(PairSampler.Resume(a, ArgonMass, Room, ShortDirect, checkpoint));
    }

    [Fact]
    public void The_landscape_fingerprint_sees_a_window_change_that_the_description_rounds_away()
    {
        // Invented: a flat well (V = 0 everywhere), so every node energy is the same whatever the window; the windows
        // [2, 5] and [2.0000001, 5] Å print alike to six digits. Only the window itself tells the two runs apart.
        var flat = new FunctionPotential(_ => 0, Length.FromAngstroms(1.0), Length.FromAngstroms(6.0),
            _ => new PairDerivatives(0, 0, 0, 0, 0), "invented flat well");
        var a = PairLandscape.Line(flat, Length.FromAngstroms(2.0), Length.FromAngstroms(5.0));
        var b = PairLandscape.Line(flat, Length.FromAngstroms(2.0000001), Length.FromAngstroms(5.0));
        Assert.Equal(a.Description, b.Description);
        var checkpoint = FirstCheckpoint(a);
        var ex = Assert.Throws<CheckpointException>(() => PairSampler.Resume(b, ArgonMass, Room, ShortDirect, checkpoint));
        Assert.Contains("in its potential, window, sites or confinement", ex.Message);
    }

    [Fact]
    public void A_metropolis_checkpoint_records_the_lane_width_the_run_used()
    {
        // Eight chains on one thread: the widest native register that still gives the thread full vectors
        // (8 with AVX-512, 4 with AVX2, 2 with SSE2 or NEON), never the one-chain fallback on vector hardware.
        var settings = Small(SamplingMethod.Metropolis, samples: 3 * 4096) with { Chains = 8, MaxThreads = 1 };
        int expected = LaneGroups.ChooseLanes(8, 1, null);
        if (System.Runtime.Intrinsics.Vector128.IsHardwareAccelerated)
        {
            Assert.True(expected > 1, $"lanes {expected}");
        }
        var saved = new List<SamplingCheckpoint>();
        PairSampler.SweepWithCheckpoints(IronLine, ArgonMass, Room, settings, new CheckpointOptions(TimeSpan.FromHours(1), saved.Add));
        Assert.NotEmpty(saved);
        Assert.All(saved, c => Assert.Equal(expected, c.ChainsPerVector));
    }

    [Fact]
    public void Direct_draws_give_the_independent_draw_error_bars_and_keep_the_first_draws()
    {
        // Direct draws are independent, so the standard errors must be those of N independent values (common practice,
        // no source): SE(mean) = σ/√N and SE(σ²) = σ²·√((κ + 2)/N), with κ the excess kurtosis. The estimated ESS is
        // only an estimate, hence 15 %. The RMS error is the delta method's SE(σ²)/(2σ), and the shift is ⟨r⟩ − r0.
        const int chains = 2, n = 1 << 16;
        var settings = Small(SamplingMethod.Direct, samples: n) with { RetainedDrawsPerChain = 50 };
        var report = PairSampler.Run(IronLine, ArgonMass, Temperature.FromKelvin(600), settings);
        double total = chains * (double)n, variance = report.Variance.Value;
        Assert.Equal(chains * (long)n, report.Diagnostics.Draws);
        Assert.Equal(Math.Sqrt(variance / total), report.Mean.StandardError, 0.15 * Math.Sqrt(variance / total));
        double varianceSe = variance * Math.Sqrt((report.ExcessKurtosis + 2) / total);
        Assert.Equal(varianceSe, report.Variance.StandardError, 0.15 * varianceSe);
        Assert.Equal(Math.Sqrt(variance), report.Rms.Value, 15);
        Assert.Equal(report.Variance.StandardError / (2 * report.Rms.Value), report.Rms.StandardError, 15);
        Assert.Equal(report.Mean.Value - report.MinimumInAngstroms!.Value, report.MeanShift!.Value, 15);
        Assert.Equal(report.Mean.StandardError, report.MeanShift.StandardError);
        Assert.Equal(chains, report.Draws.Chains.Length);
        Assert.All(report.Draws.Chains, c => Assert.Equal(50, c.Length));
        Assert.All(report.Draws.Chains, c => Assert.All(c, r => Assert.InRange(r, 2.0, 5.0)));
        Assert.NotEqual(report.Draws.Chains[0][0], report.Draws.Chains[1][0]);
        // Direct draws have no proposal width and no acceptance rate.
        Assert.Null(report.Diagnostics.FinalStepWidthInAngstroms);
        Assert.Null(report.Diagnostics.AcceptanceRate);
    }

    [Fact]
    public void Metropolis_chains_start_at_spread_quantiles_of_the_exact_distribution()
    {
        // Over-dispersed starts: chain c of C begins at the exact distribution's quantile 0.01 + 0.98·c/(C − 1), one
        // chain at the median. A step of 1e-9 Å and no burn-in keep each chain's first draw at its start.
        var t = Temperature.FromKelvin(600);
        var exact = ExactPairDistribution.Compute(IronLine, t);
        foreach (int chains in new[] { 1, 3 })
        {
            var settings = Small(SamplingMethod.Metropolis, samples: 4096) with { Chains = chains, InitialStepWidthInAngstroms = 1e-9, RetainedDrawsPerChain = 1 };
            var report = PairSampler.Run(IronLine, ArgonMass, t, settings);
            for (int c = 0; c < chains; c++)
            {
                double p = chains == 1 ? 0.5 : 0.01 + 0.98 * c / (chains - 1);
                Assert.Equal(p, exact.CumulativeProbability(report.Draws.Chains[c][0]), 2e-3);
            }
        }
    }

    [Theory]
    [InlineData(0.25)]
    [InlineData(0.7)]
    public void Metropolis_adapts_its_step_to_the_requested_acceptance(double target)
    {
        // The step width adapts during burn-in (Robbins–Monro on log w), so after a long burn-in the sampling phase
        // accepts close to the target (common practice, no source; 0.05 is a margin for the chains' noise).
        var settings = Small(SamplingMethod.Metropolis, samples: 20_000) with { BurnIn = 20_000, TargetAcceptance = target };
        var report = PairSampler.Run(IronLine, ArgonMass, Temperature.FromKelvin(600), settings);
        Assert.InRange(report.Diagnostics.AcceptanceRate!.Value, target - 0.05, target + 0.05);
        Assert.DoesNotContain(report.Warnings, w => w.Code == WarningCodes.AcceptanceOffTarget);
    }

    [Fact]
    public void Metropolis_progress_counts_burn_in_in_the_total()
    {
        var (seen, sink) = ProgressLog();
        PairSampler.Run(IronLine, ArgonMass, Temperature.FromKelvin(300), Small(SamplingMethod.Metropolis, samples: 8192) with { BurnIn = 4096 }, sink);
        Assert.NotEmpty(seen);
        Assert.All(seen, p => Assert.Equal(4096 + 8192, p.ChainStepsTotal));
        Assert.Contains(seen, p => p.ChainStepsDone == 4096 + 8192);
    }

    [Fact]
    public void Direct_chains_report_progress_every_4096_draws_and_once_at_the_end()
    {
        // 10 × 4096 draws: the throttle interval is max(N/200, 4096) = 4096, so reports come at 0, 4096, …, 36864 and N.
        // A burn-in setting does not apply to direct draws and is not in the total.
        long n = 10 * 4096;
        var (seen, sink) = ProgressLog();
        PairSampler.Run(IronLine, ArgonMass, Temperature.FromKelvin(300), Small(SamplingMethod.Direct, samples: n) with { BurnIn = 4096 }, sink);
        foreach (int chain in new[] { 0, 1 })
        {
            var done = seen.Where(p => p.ChainIndex == chain).Select(p => p.ChainStepsDone).ToArray();
            Assert.Equal(Enumerable.Range(0, 10).Select(k => 4096L * k).Append(n), done);
            Assert.All(seen.Where(p => p.ChainIndex == chain), p => Assert.Equal(n, p.ChainStepsTotal));
        }
    }
}
