using System;
using System.Collections.Generic;
using System.Linq;
using System.Threading;
using ThermalSampling.Persistence;
using ThermalSampling.Analysis;
using ThermalSampling.Landscapes;
using ThermalSampling.Randomness;
using ThermalSampling.Reports;
using ThermalSampling.Sampling;
using ThermalSampling.Statistics;
using Xunit;

namespace ThermalSampling.Tests;

/// <summary>
/// Direct checks of the pieces every sampler shares (the batch-mean store, the draw recorder, the bin counter, the chain
/// scheduler, the pooled diagnostics and their warnings) and of the settings' ranges, written against what the chains
/// mutation mode can change (docs/validation.md). The references are two-pass sums, counts by hand and the formulas the
/// code documents, restated here.
/// </summary>
public class ChainInfrastructureTests
{
    private static double[] Normals(int count, ulong seed, double mean = 0, double sd = 1)
    {
        var random = RandomStream.FromSeed(seed);
        var x = new double[count];
        for (int i = 0; i < count; i++)
        {
            x[i] = mean + sd * random.NextStandardNormal();
        }
        return x;
    }

    [Fact]
    public void A_batch_means_store_keeps_whole_batches_of_the_ceiling_of_n_over_cap_draws()
    {
        // 1000 draws, at most 64 batches: k = ⌈1000/64⌉ = 16, so 62 whole batches; the last 8 draws are left out.
        var x = Normals(1000, 1, mean: 5);
        var store = new BatchMeansStore(1000, 64, 4.5);
        foreach (double v in x)
        {
            store.Add(v);
        }
        Assert.Equal(16, store.BatchSize);
        Assert.Equal(62, store.First.Length);
        Assert.Equal(4.5, store.Reference);
        double mu = x.Take(62 * 16).Average();
        var means = store.Means();
        var squared = store.SquaredDeviationMeans(mu);
        for (int j = 0; j < 62; j++)
        {
            var batch = x.Skip(16 * j).Take(16).ToArray();
            Assert.Equal(batch.Average(v => v - 4.5), store.First[j], 1e-12);
            Assert.Equal(batch.Average(v => (v - 4.5) * (v - 4.5)), store.Second[j], 1e-12);
            Assert.Equal(batch.Average(), means[j], 1e-12);
            Assert.Equal(batch.Average(v => (v - mu) * (v - mu)), squared[j], 1e-12);
        }
        // Fewer draws than the cap: batches of one, the draws themselves.
        var single = new BatchMeansStore(50, 64, 1);
        foreach (double v in x.Take(50))
        {
            single.Add(v);
        }
        Assert.Equal(1, single.BatchSize);
        Assert.Equal(x.Take(50).Select(v => v - 1), single.First);
    }

    [Fact]
    public void Batch_sums_give_the_same_bits_as_adding_the_draws_and_stop_at_the_last_batch()
    {
        var x = Normals(640, 2);
        var added = new BatchMeansStore(640, 64, 0.25);
        var summed = new BatchMeansStore(640, 64, 0.25);
        foreach (double v in x)
        {
            added.Add(v);
        }
        for (int j = 0; j < 64; j++)
        {
            double s1 = 0, s2 = 0;
            for (int i = 0; i < 10; i++)
            {
                double d = x[10 * j + i] - 0.25;
                s1 += d;
                s2 += d * d;
            }
            summed.AddBatchSums(s1, s2);
        }
        summed.AddBatchSums(1e6, 1e6); // a 65th batch has nowhere to go and is dropped
        Assert.Equal(added.First, summed.First);
        Assert.Equal(added.Second, summed.Second);
    }

    [Fact]
    public void A_batch_means_store_resumes_from_its_saved_state_bit_for_bit()
    {
        var x = Normals(1000, 3);
        var whole = new BatchMeansStore(1000, 64, 0.5);
        var first = new BatchMeansStore(1000, 64, 0.5);
        for (int i = 0; i < 1000; i++)
        {
            whole.Add(x[i]);
            if (i < 389)
            {
                first.Add(x[i]); // 24 closed batches of 16 and 5 draws in the open one
            }
        }
        var writer = new StateWriter();
        first.Save(writer);
        var resumed = new BatchMeansStore(1000, 64, 0.5);
        var reader = new StateReader(writer.ToArray(), "test store");
        resumed.Load(reader);
        reader.End();
        foreach (double v in x.Skip(389))
        {
            resumed.Add(v);
        }
        Assert.Equal(whole.First, resumed.First);
        Assert.Equal(whole.Second, resumed.Second);
    }

    [Theory]
    [InlineData(63, 0, "the number of closed batches = 63 is outside 0 to 62")]
    [InlineData(-1, 0, "the number of closed batches = -1 is outside 0 to 62")]
    [InlineData(3, 16, "the draws in the open batch = 16 is outside 0 to 15")]
    [InlineData(3, -1, "the draws in the open batch = -1 is outside 0 to 15")]
    public void A_batch_means_store_refuses_saved_counts_outside_its_sizes(long batches, long filled, string message)
    {
        var writer = new StateWriter();
        writer.Longs("BMIX", [batches, filled]);
        writer.Doubles("BMSU", [0, 0]);
        var store = new BatchMeansStore(1000, 64, 0);
        var ex = Assert.Throws<CheckpointException>(() => store.Load(new StateReader(writer.ToArray(), "test store")));
        Assert.Contains(message, ex.Message);
    }

    [Fact]
    public void A_draw_recorder_keeps_the_first_draws_up_to_its_cap_and_resumes_them()
    {
        Assert.Equal(7, new DrawRecorder<double>(7, 100).Capacity);
        var recorder = new DrawRecorder<Position>(1000, 3);
        Assert.Equal(3, recorder.Capacity);
        for (int i = 0; i < 5; i++)
        {
            recorder.Add(new Position(i, -i, 2 * i));
        }
        Assert.Equal(new[] { new Position(0, 0, 0), new Position(1, -1, 2), new Position(2, -2, 4) }, recorder.ToImmutable());

        var part = new DrawRecorder<Position>(1000, 3);
        part.Add(new Position(0, 0, 0));
        var writer = new StateWriter();
        part.Save(writer, 3);
        var resumed = new DrawRecorder<Position>(1000, 3);
        resumed.Load(new StateReader(writer.ToArray(), "test draws"), 3);
        for (int i = 1; i < 5; i++)
        {
            resumed.Add(new Position(i, -i, 2 * i));
        }
        Assert.Equal(recorder.ToImmutable().ToArray(), resumed.ToImmutable().ToArray());

        var odd = new StateWriter();
        odd.Doubles("DRAW", [1, 2, 3, 4]);
        var ex = Assert.Throws<CheckpointException>(() => new DrawRecorder<Position>(1000, 3).Load(new StateReader(odd.ToArray(), "test draws"), 3));
        Assert.Contains("do not divide into whole draws", ex.Message);
        var tooMany = new StateWriter();
        tooMany.Doubles("DRAW", new double[12]);
        Assert.Throws<CheckpointException>(() => new DrawRecorder<Position>(1000, 3).Load(new StateReader(tooMany.ToArray(), "test draws"), 3));
    }

    [Fact]
    public void Draw_recorders_combine_in_chain_order_and_to_none_when_nothing_was_kept()
    {
        var a = new DrawRecorder<double>(10, 2);
        var b = new DrawRecorder<double>(10, 2);
        a.Add(1);
        b.Add(2);
        b.Add(3);
        var both = ReportParts.Draws([a, b]);
        Assert.Equal(2, both.Chains.Length);
        Assert.Equal(new[] { 1.0 }, both.Chains[0]);
        Assert.Equal(new[] { 2.0, 3.0 }, both.Chains[1]);
        Assert.Same(RetainedDraws<double>.None, ReportParts.Draws([new DrawRecorder<double>(10, 0), new DrawRecorder<double>(10, 0)]));
        // One chain that kept something is enough for the per-chain lists.
        Assert.Equal(2, ReportParts.Draws([new DrawRecorder<double>(10, 0), a]).Chains.Length);
    }

    [Fact]
    public void A_bin_counter_counts_its_closed_range_and_puts_the_upper_edge_in_the_last_bin()
    {
        var bins = new BinCounter(1, 3, 4); // edges 1, 1.5, 2, 2.5, 3
        foreach (double x in new[] { 1.0, 1.49, 1.5, 2.0, 2.75, 2.9999999, 3.0, 0.9999, 3.0001, double.NaN, double.PositiveInfinity })
        {
            bins.Add(x);
        }
        Assert.Equal(new long[] { 2, 1, 1, 3 }, bins.Counts);
        Assert.Equal(1, bins.Lower);
        Assert.Equal(3, bins.Upper);
        Assert.Equal(2, bins.Scale);
        bins.AddCounts([10, 0, 0, 1]);
        Assert.Equal(new long[] { 12, 1, 1, 4 }, bins.Counts);
        var writer = new StateWriter();
        bins.Save(writer);
        var loaded = new BinCounter(1, 3, 4);
        loaded.Load(new StateReader(writer.ToArray(), "test bins"));
        Assert.Equal(bins.Counts, loaded.Counts);
    }

    [Fact]
    public void Combined_bins_give_densities_and_binomial_errors_over_the_effective_sample_size()
    {
        // Density p_i/w and error √(p_i(1 − p_i)/ESS)/w (common practice, no source), p_i the pooled fraction in bin i.
        var a = new BinCounter(0, 2, 4);
        var b = new BinCounter(0, 2, 4);
        a.AddCounts([1, 2, 3, 4]);
        b.AddCounts([4, 3, 2, 1]);
        var h = ReportParts.Histogram([a, b], 5);
        Assert.Equal(20, h.Count);
        Assert.Equal(0, h.Lower);
        Assert.Equal(2, h.Upper);
        double w = 0.5;
        Assert.Equal(5 / 20.0 / w, h.Density[0], 15);
        Assert.Equal(5 / 20.0 / w, h.Density[3], 15);
        Assert.Equal(Math.Sqrt(0.25 * 0.75 / 5) / w, h.DensityStandardError[0], 15);
        Assert.Equal(1.0, h.Density.Sum() * w, 15);
        // An effective sample size below one is taken as one, and a bin's p in the error is at least half an effective draw
        // (1/(2·ESS) = 0.5 here): the error bar is a single draw's at most.
        Assert.Equal(Math.Sqrt(0.5 * 0.5) / w, ReportParts.Histogram([a, b], 0.2).DensityStandardError[0], 15);
        // An empty bin among counted ones has the error of half an effective draw, not zero.
        var c = new BinCounter(0, 2, 4);
        c.AddCounts([0, 10, 5, 5]);
        Assert.Equal(0, ReportParts.Histogram([c], 8).Density[0]);
        Assert.Equal(Math.Sqrt(0.5 / 8 * (1 - 0.5 / 8) / 8) / w, ReportParts.Histogram([c], 8).DensityStandardError[0], 15);
        // Nothing counted: zero density, not NaN.
        var empty = ReportParts.Histogram([new BinCounter(0, 2, 4)], 10);
        Assert.All(empty.Density, d => Assert.Equal(0, d));
        Assert.All(empty.DensityStandardError, e => Assert.Equal(0, e));
    }

    [Fact]
    public void The_chain_scheduler_keeps_chain_order_and_the_thread_limit()
    {
        int running = 0, most = 0;
        var results = ChainScheduler.RunAll(12, 2, CancellationToken.None, c =>
        {
            int now = Interlocked.Increment(ref running);
            int seen;
            while ((seen = Volatile.Read(ref most)) < now && Interlocked.CompareExchange(ref most, now, seen) != seen)
            {
            }
            Thread.Sleep(20);
            Interlocked.Decrement(ref running);
            return c * c;
        });
        Assert.Equal(Enumerable.Range(0, 12).Select(c => c * c), results);
        Assert.InRange(most, 1, 2);
        var one = ChainScheduler.RunAll(3, 1, CancellationToken.None, c => c + 1);
        Assert.Equal(new[] { 1, 2, 3 }, one);
        // One thread asked for: never two chains at once, however many cores there are.
        running = 0;
        most = 0;
        ChainScheduler.RunAll(8, 1, CancellationToken.None, c =>
        {
            int now = Interlocked.Increment(ref running);
            int seen;
            while ((seen = Volatile.Read(ref most)) < now && Interlocked.CompareExchange(ref most, now, seen) != seen)
            {
            }
            Thread.Sleep(50); // long enough for a second worker to join, were one allowed
            Interlocked.Decrement(ref running);
            return c;
        });
        Assert.Equal(1, most);
    }

    [Fact]
    public void The_pooled_mean_error_of_one_chain_is_its_batch_mean_variance_times_tau_over_m()
    {
        // Var(x̄) = s²_Y·max(τ, 1/M)/M with the sample variance s²_Y (divisor M − 1) of the M batch means (the formula in
        // the method's documentation), on eight invented values.
        double[] y = [0.3, -1.2, 0.8, 2.1, -0.4, 0.0, 1.5, -0.9];
        double mean = y.Average(), s2 = y.Sum(v => (v - mean) * (v - mean)) / (y.Length - 1);
        double tau = Autocorrelation.Estimate(y).IntegratedTime;
        Assert.Equal(Math.Sqrt(s2 * Math.Max(tau, 1.0 / y.Length) / y.Length), ChainDiagnostics.PooledMeanStandardError([y]), 1e-15);
    }

    [Fact]
    public void The_chain_scheduler_surfaces_a_chains_own_exception_and_honours_cancellation()
    {
        var ex = Assert.Throws<InvalidOperationException>(() => ChainScheduler.RunAll<int>(4, 1, CancellationToken.None,
            c => c == 2 ? throw new InvalidOperationException("chain 2 failed") : c));
        Assert.Equal("chain 2 failed", ex.Message);
        using var cancelled = new CancellationTokenSource();
        cancelled.Cancel();
        int ran = 0;
        Assert.ThrowsAny<OperationCanceledException>(() => ChainScheduler.RunAll(4, 1, cancelled.Token, c => Interlocked.Increment(ref ran)));
        Assert.Equal(0, ran);
    }

    [Fact]
    public void Pooled_diagnostics_of_independent_chains_give_their_draw_count_and_combine_as_the_plain_average()
    {
        // Independent unit normals: τ ≈ 1 and ESS ≈ C·N within the estimator's noise (15 %). The pooled ESS of the plain
        // average of C chain means is C²/Σ_c(1/ESS_c), each ESS_c the one-chain value; τ = C·N/ESS; the blocking error is
        // √(Σ_c SE_c²)/C with SE_c each chain's own blocking error.
        const int n = 4096;
        var a = Normals(n, 21);
        var b = Normals(n, 22, sd: 1.3);
        double variance = a.Concat(b).Select(v => v * v).Average();
        var pooled = ChainDiagnostics.Summarise([a, b], 1, n, variance);
        var ea = ChainDiagnostics.Summarise([a], 1, n, variance).Ess;
        var eb = ChainDiagnostics.Summarise([b], 1, n, variance).Ess;
        Assert.Equal(4 / (1 / ea + 1 / eb), pooled.Ess, 1e-9 * pooled.Ess);
        Assert.Equal(2.0 * n / pooled.Ess, pooled.Tau, 1e-12);
        Assert.InRange(pooled.Ess, 0.85 * 2 * n, 1.15 * 2 * n);
        double sa = Blocking.Estimate(a).StandardError, sb = Blocking.Estimate(b).StandardError;
        Assert.Equal(Math.Sqrt(sa * sa + sb * sb) / 2, pooled.BlockingStandardError, 1e-15);
        Assert.True(pooled.AllReliable);
        Assert.Equal("", pooled.Reason);
        Assert.NotNull(pooled.RHat);
        Assert.Null(ChainDiagnostics.Summarise([a, b], 1, n, variance, withRHat: false).RHat);
        Assert.Null(ChainDiagnostics.Summarise([a], 1, n, variance).RHat);

        // The pooled standard error without a per-draw variance: √(Σ_c Var(x̄_c))/C, with Var(x̄_c) = σ²/ESS_c.
        double se = ChainDiagnostics.PooledMeanStandardError([a, b]);
        Assert.Equal(Math.Sqrt(variance / ea + variance / eb) / 2, se, 1e-9 * se);
        Assert.Equal(Math.Sqrt(variance / ea), ChainDiagnostics.PooledMeanStandardError([a]), 1e-9 * se);
    }

    [Fact]
    public void A_chain_ess_is_capped_at_ten_times_its_draws_and_a_constant_chain_counts_its_draws()
    {
        // An alternating series has a tiny variance of its mean, which would claim an ESS of about N²; it is capped at 10N.
        const int n = 1000;
        var alternating = Enumerable.Range(0, n).Select(i => i % 2 == 0 ? 1.0 : -1.0).ToArray();
        Assert.Equal(10.0 * n, ChainDiagnostics.Summarise([alternating], 1, n, 1).Ess, 1e-9);
        // 0.7 repeated has a computed mean an ulp off 0.7; its ulp-sized deviations once claimed an ESS of 10N.
        var constant = Enumerable.Repeat(0.7, n).ToArray();
        Assert.NotEqual(0.7, constant.Average());
        Assert.Equal(n, ChainDiagnostics.Summarise([constant], 1, n, 1).Ess, 1e-9);
        Assert.Equal(0, ChainDiagnostics.PooledMeanStandardError([constant]));
        // A zero per-draw variance (every draw the same) counts the draws too.
        Assert.Equal(n, ChainDiagnostics.Summarise([Normals(n, 4)], 1, n, 0).Ess, 1e-9);
    }

    [Fact]
    public void An_unreliable_chain_is_reported_with_its_reason_and_the_batch_size_it_was_measured_on()
    {
        // A random walk of 200 steps: τ is far above N/50, so the estimate is unreliable (Sokal's rule).
        var random = RandomStream.FromSeed(8);
        var walk = new double[200];
        for (int i = 1; i < walk.Length; i++)
        {
            walk[i] = walk[i - 1] + random.NextStandardNormal();
        }
        var good = Normals(200, 9);
        string reason = Autocorrelation.Estimate(walk).Reason;
        Assert.NotEqual("", reason);
        var perDraw = ChainDiagnostics.Summarise([good, walk], 1, 200, 1);
        Assert.False(perDraw.AllReliable);
        Assert.Equal(reason, perDraw.Reason);
        var batched = ChainDiagnostics.Summarise([walk, good], 7, 1400, 1);
        Assert.Equal(reason + " (measured on batch means of 7 draws)", batched.Reason);
    }

    [Fact]
    public void Coarsening_averages_groups_of_the_ceiling_of_length_over_cap_and_drops_the_remainder()
    {
        var y = Normals(3000, 10);
        var coarse = ChainDiagnostics.Coarsened([y], 1024)[0]; // g = 3, 1000 values
        Assert.Equal(1000, coarse.Length);
        for (int i = 0; i < 1000; i++)
        {
            Assert.Equal((y[3 * i] + y[3 * i + 1] + y[3 * i + 2]) / 3, coarse[i], 1e-15);
        }
        var justOver = ChainDiagnostics.Coarsened([y.Take(1025).ToArray()], 1024)[0]; // g = 2, 512 values, the last one dropped
        Assert.Equal(512, justOver.Length);
        Assert.Equal((y[1022] + y[1023]) / 2, justOver[511], 1e-15);
        IReadOnlyList<double[]> fits = [y.Take(1024).ToArray()];
        Assert.Same(fits, ChainDiagnostics.Coarsened(fits, 1024));
    }

    private static ChainDiagnostics.Summary Healthy => new(1, 400, 0.01, true, "", RHat.Threshold);

    private static List<Warning> WarningsFor(ChainDiagnostics.Summary summary, double? acceptance = null, double? target = null)
    {
        var builder = System.Collections.Immutable.ImmutableArray.CreateBuilder<Warning>();
        ReportParts.AddConvergenceWarnings(builder, summary, acceptance, target);
        return builder.ToList();
    }

    [Fact]
    public void Convergence_warnings_start_just_past_their_thresholds()
    {
        // At the R-hat and ESS thresholds themselves (1.01, 400), and within 0.15 of the target acceptance, nothing is raised.
        Assert.Empty(WarningsFor(Healthy, 0.45, 0.31));
        Assert.Empty(WarningsFor(Healthy with { RHat = null }, 0.17, 0.31));
        Assert.Empty(WarningsFor(Healthy, 0.9, null));
        Assert.Empty(WarningsFor(Healthy, null, 0.31));
        // "More than 0.15 from the target": 0.1 against 0.25 is exactly 0.15 off in binary arithmetic, 0.4 against 0.25 just over.
        Assert.Equal(0.15, Math.Abs(0.1 - 0.25));
        Assert.Empty(WarningsFor(Healthy, 0.1, 0.25));
        Assert.True(Math.Abs(0.4 - 0.25) > 0.15);
        Assert.Single(WarningsFor(Healthy, 0.4, 0.25));

        var rHat = Assert.Single(WarningsFor(Healthy with { RHat = 1.0101 }));
        Assert.Equal(WarningCodes.RHatHigh, rHat.Code);
        Assert.Contains("R-hat = 1.01 is above 1.01", rHat.Message);
        var ess = Assert.Single(WarningsFor(Healthy with { Ess = 250 }));
        Assert.Equal(WarningCodes.LowEffectiveSampleSize, ess.Code);
        Assert.Contains("effective sample size is 250, below 400", ess.Message);
        var shortChain = Assert.Single(WarningsFor(Healthy with { AllReliable = false, Reason = "invented reason" }));
        Assert.Equal(WarningCodes.ShortChain, shortChain.Code);
        Assert.Equal("invented reason", shortChain.Message);
        foreach (double acceptance in new[] { 0.47, 0.15 })
        {
            var off = Assert.Single(WarningsFor(Healthy, acceptance, 0.31));
            Assert.Equal(WarningCodes.AcceptanceOffTarget, off.Code);
            Assert.Contains("far from the target", off.Message);
        }
        Assert.Equal(4, WarningsFor(new ChainDiagnostics.Summary(9, 10, 0.1, false, "short", 1.5), 0.9, 0.31).Count);
    }

    public static TheoryData<string, Func<SamplingSettings, SamplingSettings>, bool> SettingRanges => new()
    {
        { "Chains", s => s with { Chains = 1 }, true },
        { "Chains", s => s with { Chains = 1024 }, true },
        { "Chains", s => s with { Chains = 0 }, false },
        { "Chains", s => s with { Chains = 1025 }, false },
        { "SamplesPerChain", s => s with { SamplesPerChain = 10 }, true },
        { "SamplesPerChain", s => s with { SamplesPerChain = 1_000_000_000_000 }, true },
        { "SamplesPerChain", s => s with { SamplesPerChain = 9 }, false },
        { "SamplesPerChain", s => s with { SamplesPerChain = 1_000_000_000_001 }, false },
        { "BurnIn", s => s with { BurnIn = 0 }, true },
        { "BurnIn", s => s with { BurnIn = 1_000_000_000_000 }, true },
        { "BurnIn", s => s with { BurnIn = -1 }, false },
        { "BurnIn", s => s with { BurnIn = 1_000_000_000_001 }, false },
        { "TargetAcceptance", s => s with { TargetAcceptance = 0.001 }, true },
        { "TargetAcceptance", s => s with { TargetAcceptance = 0.999 }, true },
        { "TargetAcceptance", s => s with { TargetAcceptance = 0 }, false },
        { "TargetAcceptance", s => s with { TargetAcceptance = 1 }, false },
        { "TargetAcceptance", s => s with { TargetAcceptance = double.NaN }, false },
        { "InitialStepWidthInAngstroms", s => s with { InitialStepWidthInAngstroms = 1e-12 }, true },
        { "InitialStepWidthInAngstroms", s => s with { InitialStepWidthInAngstroms = 0 }, false },
        { "InitialStepWidthInAngstroms", s => s with { InitialStepWidthInAngstroms = -1 }, false },
        { "InitialStepWidthInAngstroms", s => s with { InitialStepWidthInAngstroms = double.PositiveInfinity }, false },
        { "InitialStepWidthInAngstroms", s => s with { InitialStepWidthInAngstroms = double.NaN }, false },
        { "HistogramBins", s => s with { HistogramBins = 4 }, true },
        { "HistogramBins", s => s with { HistogramBins = 10_000 }, true },
        { "HistogramBins", s => s with { HistogramBins = 3 }, false },
        { "HistogramBins", s => s with { HistogramBins = 10_001 }, false },
        { "MaxDiagnosticValuesPerChain", s => s with { MaxDiagnosticValuesPerChain = 64 }, true },
        { "MaxDiagnosticValuesPerChain", s => s with { MaxDiagnosticValuesPerChain = 10_000_000 }, true },
        { "MaxDiagnosticValuesPerChain", s => s with { MaxDiagnosticValuesPerChain = 63 }, false },
        { "MaxDiagnosticValuesPerChain", s => s with { MaxDiagnosticValuesPerChain = 10_000_001 }, false },
        { "RetainedDrawsPerChain", s => s with { RetainedDrawsPerChain = 0 }, true },
        { "RetainedDrawsPerChain", s => s with { RetainedDrawsPerChain = 10_000_000 }, true },
        { "RetainedDrawsPerChain", s => s with { RetainedDrawsPerChain = -1 }, false },
        { "RetainedDrawsPerChain", s => s with { RetainedDrawsPerChain = 10_000_001 }, false },
        { "MaxThreads", s => s with { MaxThreads = 1 }, true },
        { "MaxThreads", s => s with { MaxThreads = 1024 }, true },
        { "MaxThreads", s => s with { MaxThreads = 0 }, false },
        { "MaxThreads", s => s with { MaxThreads = 1025 }, false },
        { "ChainsPerVector", s => s with { ChainsPerVector = 1 }, true },
        { "ChainsPerVector", s => s with { ChainsPerVector = 2 }, true },
        { "ChainsPerVector", s => s with { ChainsPerVector = 4 }, true },
        { "ChainsPerVector", s => s with { ChainsPerVector = 8 }, true },
        { "ChainsPerVector", s => s with { ChainsPerVector = 3 }, false },
        { "ChainsPerVector", s => s with { ChainsPerVector = 16 }, false },
        { "ChainsPerVector", s => s with { ChainsPerVector = 0 }, false },
        { "Method", s => s with { Method = (SamplingMethod)7 }, false },
    };

    [Fact]
    public void Each_refusal_names_the_value_given_and_the_documented_range()
    {
        var bad = new SamplingSettings
        {
            Seed = 1, Method = (SamplingMethod)7, Chains = 0, SamplesPerChain = 9, BurnIn = -1, TargetAcceptance = 1.5, InitialStepWidthInAngstroms = -2,
            HistogramBins = 3, MaxDiagnosticValuesPerChain = 63, RetainedDrawsPerChain = -1, MaxThreads = 1025, ChainsPerVector = 3,
        };
        string message = Assert.Throws<ArgumentException>(bad.Validate).Message;
        foreach (var (name, value, range) in new[]
        {
            ("Method", "7", "Metropolis or Direct"), ("Chains", "0", "1 to 1024"), ("SamplesPerChain", "9", "10 to 10^12"), ("BurnIn", "-1", "0 to 10^12"),
            ("TargetAcceptance", "1.5", "null or strictly between 0 and 1"), ("InitialStepWidthInAngstroms", "-2", "null or finite and greater than 0"),
            ("HistogramBins", "3", "4 to 10000"), ("MaxDiagnosticValuesPerChain", "63", "64 to 10^7"), ("RetainedDrawsPerChain", "-1", "0 to 10^7"),
            ("MaxThreads", "1025", "null or 1 to 1024"), ("ChainsPerVector", "3", "null, 1, 2, 4 or 8"),
        })
        {
            Assert.Contains($"{name} = {value} is out of range; valid: {range}.", message, StringComparison.Ordinal);
        }
    }

    [Theory]
    [MemberData(nameof(SettingRanges))]
    public void Each_setting_is_checked_at_both_ends_of_its_documented_range(string name, Func<SamplingSettings, SamplingSettings> change, bool valid)
    {
        var settings = change(new SamplingSettings { Seed = 1 });
        if (valid)
        {
            settings.Validate();
            return;
        }
        var ex = Assert.Throws<ArgumentException>(settings.Validate);
        Assert.Equal("settings", ex.ParamName);
        Assert.Contains(name + " = ", ex.Message);
        Assert.Contains("is out of range; valid: ", ex.Message);
    }

    [Fact]
    public void Settings_have_their_documented_defaults_and_list_every_invalid_one_at_once()
    {
        var defaults = new SamplingSettings { Seed = 1 };
        defaults.Validate();
        Assert.Equal(SamplingMethod.Metropolis, defaults.Method);
        Assert.Equal(4, defaults.Chains);
        Assert.Equal(100_000, defaults.SamplesPerChain);
        Assert.Equal(10_000, defaults.BurnIn);
        Assert.Null(defaults.TargetAcceptance);
        Assert.Null(defaults.InitialStepWidthInAngstroms);
        Assert.Equal(60, defaults.HistogramBins);
        Assert.Equal(1 << 14, defaults.MaxDiagnosticValuesPerChain);
        Assert.Equal(0, defaults.RetainedDrawsPerChain);
        Assert.Null(defaults.MaxThreads);
        Assert.Null(defaults.ChainsPerVector);
        var ex = Assert.Throws<ArgumentException>((defaults with { Chains = 0, HistogramBins = 2 }).Validate);
        Assert.Contains("Chains = 0 is out of range; valid: 1 to 1024.", ex.Message);
        Assert.Contains("HistogramBins = 2 is out of range; valid: 4 to 10000.", ex.Message);
        Assert.StartsWith("Invalid sampling settings: ", ex.Message);
    }
}
