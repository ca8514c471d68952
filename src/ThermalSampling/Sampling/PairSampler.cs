using System;
using System.Collections.Generic;
using System.Collections.Immutable;
using System.Globalization;
using System.Linq;
using System.Runtime.CompilerServices;
using System.Threading;
using ThermalSampling.Persistence;
using ThermalSampling.Analysis;
using ThermalSampling.Internal;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Randomness;
using ThermalSampling.Reports;
using ThermalSampling.Statistics;
using ThermalSampling.Units;

namespace ThermalSampling.Sampling;

/// <summary>
/// Samples the separation of a line or radial pair at one temperature and returns the full vibration report.
/// </summary>
/// <remarks>
/// Metropolis chains start over-dispersed, at the 1st to 99th percentiles of the exact distribution. A cancelled run throws
/// <see cref="OperationCanceledException"/> and returns nothing partial.
/// </remarks>
public static class PairSampler
{
    /// <summary>The default Metropolis target acceptance for one coordinate (Roberts &amp; Rosenthal, Statistical Science 16, 351 (2001)).</summary>
    public const double DefaultTargetAcceptance = 0.44;

    private sealed record ChainResult(PairChainRecord Record, long Accepted, double Width);

    /// <summary>Runs the sampler.</summary>
    /// <typeparam name="TPotential">The potential type.</typeparam>
    /// <param name="landscape">The landscape.</param>
    /// <param name="mass">The particle's mass (for the harmonic and validity analyses).</param>
    /// <param name="temperature">The temperature.</param>
    /// <param name="settings">The sampling settings.</param>
    /// <param name="progress">Optional progress sink.</param>
    /// <param name="cancellationToken">Optional cancellation.</param>
    public static PairVibrationReport Run<TPotential>(PairLandscape<TPotential> landscape, Mass mass, Temperature temperature, SamplingSettings settings,
        IProgress<SamplingProgress>? progress = null, CancellationToken cancellationToken = default)
        where TPotential : struct, IPairPotential
    {
        RunArguments.Check(landscape, settings, mass, temperature);
        return RunOne(landscape, mass, temperature, settings, progress, cancellationToken, null, 0);
    }

    private static PairVibrationReport RunOne<TPotential>(PairLandscape<TPotential> landscape, Mass mass, Temperature temperature, SamplingSettings settings,
        IProgress<SamplingProgress>? progress, CancellationToken cancellationToken, CheckpointSession? session, int temperatureIndex)
        where TPotential : struct, IPairPotential
    {
        var exact = ExactPairDistribution.Compute(landscape, temperature);
        bool metropolis = settings.Method == SamplingMethod.Metropolis;
        var table = metropolis ? null : InverseCdfTable.Build(exact);
        var warnings = ImmutableArray.CreateBuilder<Warning>();
        PairHarmonicEstimate? harmonic = null;
        PairFirstOrderEstimate? firstOrder = null;
        PotentialWell? well = null;
        try
        {
            well = PairAnalysis.RequireWellInside(landscape);
            harmonic = PairAnalysis.Harmonic(landscape, mass, temperature);
            firstOrder = PairAnalysis.FirstOrder(landscape, temperature);
        }
        catch (LandscapeException ex)
        {
            well = null;
            warnings.Add(new Warning(WarningCodes.MinimumOutsideWindow, ex.Message));
        }

        double target = settings.TargetAcceptance ?? DefaultTargetAcceptance;
        double width0 = settings.InitialStepWidthInAngstroms ?? harmonic?.ClassicalRmsInAngstroms ?? landscape.WindowWidthInAngstroms / 10;
        width0 = Math.Min(width0, landscape.WindowWidthInAngstroms);
        int chains = settings.Chains;
        var quantile = metropolis ? StartQuantiles(exact) : null;
        PairChainRecord NewRecord(int c) => new(
            new BinCounter(landscape.WindowLowerInAngstroms, landscape.WindowUpperInAngstroms, settings.HistogramBins),
            new BatchMeansStore(settings.SamplesPerChain, settings.MaxDiagnosticValuesPerChain, well?.EquilibriumDistance ?? exact.MeanInAngstroms),
            new DrawRecorder<double>(settings.SamplesPerChain, settings.RetainedDrawsPerChain));
        ProgressReporter NewReporter(int c) => new(progress, c, (metropolis ? settings.BurnIn : 0) + settings.SamplesPerChain, temperature.InKelvin);

        ChainResult[] results;
        if (metropolis)
        {
            var plan = new PairLaneChains.Plan<TPotential>(landscape.Potential, landscape.WindowLowerInAngstroms, landscape.WindowUpperInAngstroms,
                1 / temperature.ThermalEnergyInElectronVolts, landscape.Geometry == SeparationGeometry.Radial, width0, target,
                landscape.WindowWidthInAngstroms, settings.BurnIn, settings.SamplesPerChain, settings.Seed);
            int lanes = session?.Lanes ?? PairLaneChains.ChooseLanes(chains, settings.MaxThreads ?? Environment.ProcessorCount, settings.ChainsPerVector);
            int groupCount = (chains + lanes - 1) / lanes;
            var checkpoints = session?.Begin(temperatureIndex, groupCount) ?? GroupCheckpoints.None;
            var groups = ChainScheduler.RunAll(groupCount, settings.MaxThreads, cancellationToken,
                g => PairLaneChains.Run(lanes, plan, g * lanes, chains, c => quantile!(chains == 1 ? 0.5 : 0.01 + 0.98 * c / (chains - 1)),
                    NewRecord, NewReporter, checkpoints, g, cancellationToken));
            results = groups.SelectMany(g => g).Select(o => new ChainResult(o.Record, o.Accepted, o.Width)).ToArray();
        }
        else
        {
            var checkpoints = session?.Begin(temperatureIndex, chains) ?? GroupCheckpoints.None;
            results = ChainScheduler.RunAll(chains, settings.MaxThreads, cancellationToken,
                c => new DirectChain(table!, settings, c, NewRecord(c), NewReporter(c)).Run(checkpoints, cancellationToken));
        }
        session?.End(temperatureIndex);

        var moments = results[0].Record.Moments;
        for (int c = 1; c < chains; c++)
        {
            moments = MomentAccumulator.Merge(moments, results[c].Record.Moments);
        }
        double mean = moments.Mean, variance = moments.Variance;
        int batch = results[0].Record.Store.BatchSize;
        var summary = ChainDiagnostics.Summarise(results.Select(r => r.Record.Store.Means()).ToList(), batch, settings.SamplesPerChain, variance);
        double varianceOfSquares = Math.Max(moments.CentralMoment4 - moments.CentralMoment2 * moments.CentralMoment2, 0);
        var summarySquared = ChainDiagnostics.Summarise(results.Select(r => r.Record.Store.SquaredDeviationMeans(mean)).ToList(), batch, settings.SamplesPerChain, varianceOfSquares, withRHat: false);
        double meanSe = Math.Sqrt(variance / summary.Ess);
        double varianceSe = Math.Sqrt(varianceOfSquares / summarySquared.Ess);
        double rms = Math.Sqrt(variance);
        double? acceptance = metropolis ? results.Sum(r => (double)r.Accepted) / ((double)chains * settings.SamplesPerChain) : null;

        var meanEstimate = new Estimate(mean, meanSe);
        var varianceEstimate = new Estimate(variance, varianceSe);
        var comparison = new ExactComparison(exact.MeanInAngstroms, exact.VarianceInAngstromsSquared, exact.Skewness, exact.ExcessKurtosis, exact.WallMass,
            meanEstimate.ZScore(exact.MeanInAngstroms), varianceEstimate.ZScore(exact.VarianceInAngstromsSquared));

        var validity = ClassicalValidity.Assess(mass, temperature, rms > 0 ? rms : exact.RmsInAngstroms, harmonic?.QuantumToThermalRatio ?? 0,
            well?.WellDepth ?? double.PositiveInfinity, exact.WallHeldProbability);
        warnings.AddRange(validity.Warnings);
        ChainDiagnostics.AddConvergenceWarnings(warnings, summary, acceptance, metropolis ? target : null);
        if (Math.Abs(comparison.ZScoreMean) > 4 || Math.Abs(comparison.ZScoreVariance) > 4)
        {
            warnings.Add(new Warning(WarningCodes.DisagreesWithExact, string.Create(CultureInfo.InvariantCulture,
                $"The sampled mean or variance differs from the exact quadrature value by more than 4 standard errors (z = {comparison.ZScoreMean:G3}, {comparison.ZScoreVariance:G3}): the chains are not converged or the error bars are too small. Trust the exact value.")));
        }

        var diagnostics = new SamplingDiagnostics(acceptance, summary.Tau, summary.Ess, summary.RHat, moments.Count, summary.BlockingStandardError,
            metropolis ? results.Average(r => r.Width) : null);
        var histogram = BinCounter.Combine(results.Select(r => r.Record.Bins).ToList(), summary.Ess);
        var provenance = new Provenance(settings.Seed, RandomStream.GeneratorName, settings, Provenance.CurrentLibraryVersion, landscape.Description, mass);
        return new PairVibrationReport(temperature, landscape.Geometry, well?.EquilibriumDistance, meanEstimate,
            well is null ? null : new Estimate(mean - well.EquilibriumDistance, meanSe), varianceEstimate, new Estimate(rms, rms > 0 ? varianceSe / (2 * rms) : 0),
            moments.Skewness, moments.ExcessKurtosis, harmonic, firstOrder, comparison, diagnostics, histogram, warnings.ToImmutable(), provenance,
            DrawRecorder<double>.Combine(results.Select(r => r.Record.Draws)));
    }

    /// <summary>Runs the sampler at several temperatures with the same settings (the seed is shared; each temperature is an independent run).</summary>
    /// <typeparam name="TPotential">The potential type.</typeparam>
    /// <param name="landscape">The landscape.</param>
    /// <param name="mass">The particle's mass.</param>
    /// <param name="temperatures">The temperatures, at least one, no duplicates.</param>
    /// <param name="settings">The sampling settings.</param>
    /// <param name="progress">Optional progress sink.</param>
    /// <param name="cancellationToken">Optional cancellation.</param>
    public static ImmutableArray<PairVibrationReport> Sweep<TPotential>(PairLandscape<TPotential> landscape, Mass mass, IEnumerable<Temperature> temperatures,
        SamplingSettings settings, IProgress<SamplingProgress>? progress = null, CancellationToken cancellationToken = default)
        where TPotential : struct, IPairPotential
    {
        var list = TemperatureList.Check(temperatures);
        return list.Select(t => Run(landscape, mass, t, settings, progress, cancellationToken)).ToImmutableArray();
    }

    /// <summary>
    /// Runs the sweep and writes checkpoints as <paramref name="checkpoints"/> says, so that an interrupted sweep can be finished
    /// with <see cref="Resume"/>. When cancelled it writes a last checkpoint, then throws <see cref="OperationCanceledException"/>.
    /// The reports are the same bits as those of <see cref="Sweep{TPotential}(PairLandscape{TPotential}, Mass, IEnumerable{Temperature}, SamplingSettings, IProgress{SamplingProgress}?, CancellationToken)"/>.
    /// </summary>
    /// <typeparam name="TPotential">The potential type.</typeparam>
    /// <param name="landscape">The landscape.</param>
    /// <param name="mass">The particle's mass.</param>
    /// <param name="temperatures">The temperatures, at least one, no duplicates.</param>
    /// <param name="settings">The sampling settings.</param>
    /// <param name="checkpoints">Where and how often to write checkpoints.</param>
    /// <param name="progress">Optional progress sink.</param>
    /// <param name="cancellationToken">Optional cancellation; honoured within one chunk of 4096 steps per group.</param>
    public static ImmutableArray<PairVibrationReport> SweepWithCheckpoints<TPotential>(PairLandscape<TPotential> landscape, Mass mass, IEnumerable<Temperature> temperatures,
        SamplingSettings settings, CheckpointOptions checkpoints, IProgress<SamplingProgress>? progress = null, CancellationToken cancellationToken = default)
        where TPotential : struct, IPairPotential
    {
        Preconditions.CheckNotNull(checkpoints, nameof(checkpoints));
        var (list, identity) = Prepare(landscape, mass, temperatures, settings);
        var session = new CheckpointSession(identity, checkpoints, null, ChooseLanes(settings));
        return RunSession(landscape, mass, list, settings, session, progress, cancellationToken);
    }

    /// <summary>
    /// Finishes the sweep that wrote <paramref name="checkpoint"/>: each chain continues from its saved state to the
    /// original <see cref="SamplingSettings.SamplesPerChain"/> (a resume adds no draws beyond the original run's), and the
    /// reports of every temperature, finished before or after the checkpoint, are bit for bit those of the uninterrupted
    /// sweep. The landscape, mass, temperatures and settings must be the original ones (worker threads may differ);
    /// <paramref name="checkpoint"/> holds the temperatures and settings for convenience.
    /// </summary>
    /// <typeparam name="TPotential">The potential type.</typeparam>
    /// <param name="landscape">The original landscape.</param>
    /// <param name="mass">The original mass.</param>
    /// <param name="temperatures">The original temperatures.</param>
    /// <param name="settings">The original settings.</param>
    /// <param name="checkpoint">The checkpoint to continue from.</param>
    /// <param name="checkpoints">Where to keep writing checkpoints, or null for none.</param>
    /// <param name="progress">Optional progress sink.</param>
    /// <param name="cancellationToken">Optional cancellation.</param>
    /// <exception cref="CheckpointException">When the checkpoint comes from another library version or a different run (the message names each difference).</exception>
    public static ImmutableArray<PairVibrationReport> Resume<TPotential>(PairLandscape<TPotential> landscape, Mass mass, IEnumerable<Temperature> temperatures,
        SamplingSettings settings, SamplingCheckpoint checkpoint, CheckpointOptions? checkpoints = null, IProgress<SamplingProgress>? progress = null,
        CancellationToken cancellationToken = default)
        where TPotential : struct, IPairPotential
    {
        Preconditions.CheckNotNull(checkpoint, nameof(checkpoint));
        var (list, identity) = Prepare(landscape, mass, temperatures, settings);
        checkpoint.CheckBelongsTo(identity);
        var session = new CheckpointSession(identity, checkpoints, checkpoint, checkpoint.ChainsPerVector);
        return RunSession(landscape, mass, list, settings, session, progress, cancellationToken);
    }

    private static int ChooseLanes(SamplingSettings settings)
        => settings.Method == SamplingMethod.Metropolis ? PairLaneChains.ChooseLanes(settings.Chains, settings.MaxThreads ?? Environment.ProcessorCount, settings.ChainsPerVector) : 1;

    private static (List<Temperature> List, SweepIdentity Identity) Prepare<TPotential>(PairLandscape<TPotential> landscape, Mass mass, IEnumerable<Temperature> temperatures,
        SamplingSettings settings)
        where TPotential : struct, IPairPotential
    {
        var list = TemperatureList.Check(temperatures);
        foreach (var t in list)
        {
            RunArguments.Check(landscape, settings, mass, t);
        }
        return (list, CheckpointedSweep.Identity("pair", landscape.Description, Fingerprint(landscape), mass, list, settings));
    }

    /// <summary>The geometry, the exact window and the energies at 257 evenly spaced separations in it.</summary>
    private static string Fingerprint<TPotential>(PairLandscape<TPotential> landscape) where TPotential : struct, IPairPotential
    {
        double lo = landscape.WindowLowerInAngstroms, hi = landscape.WindowUpperInAngstroms;
        var values = new List<double> { landscape.Geometry == SeparationGeometry.Line ? 0 : 1, lo, hi };
        for (int i = 0; i <= 256; i++)
        {
            values.Add(landscape.Potential.Energy(lo + (hi - lo) * i / 256));
        }
        return SweepIdentity.FingerprintOf(values);
    }

    private static ImmutableArray<PairVibrationReport> RunSession<TPotential>(PairLandscape<TPotential> landscape, Mass mass, List<Temperature> list,
        SamplingSettings settings, CheckpointSession session, IProgress<SamplingProgress>? progress, CancellationToken cancellationToken)
        where TPotential : struct, IPairPotential
        => CheckpointedSweep.Run(list.Count, session, t => RunOne(landscape, mass, list[t], settings, progress, cancellationToken, session, t));

    /// <summary>
    /// Start positions for over-dispersed chains: the exact CDF tabulated at 256 evenly spaced separations (one
    /// Gauss–Legendre pass) and inverted by linear interpolation. Starts need no more precision than that.
    /// </summary>
    private static Func<double, double> StartQuantiles(ExactPairDistribution exact)
    {
        const int nodes = 256;
        double lo = exact.WindowLowerInAngstroms, hi = exact.WindowUpperInAngstroms, h = (hi - lo) / nodes;
        var r = new double[nodes + 1];
        var cdf = new double[nodes + 1];
        for (int i = 0; i <= nodes; i++)
        {
            r[i] = lo + i * h;
            if (i > 0)
            {
                cdf[i] = cdf[i - 1] + MathNet.Numerics.Integration.GaussLegendreRule.Integrate(exact.Density, r[i - 1], r[i], 16);
            }
        }
        double total = cdf[nodes];
        return p =>
        {
            double target = p * total;
            int i = Array.BinarySearch(cdf, target);
            if (i >= 0)
            {
                return r[i];
            }
            i = ~i;
            if (i <= 0)
            {
                return lo;
            }
            if (i > nodes)
            {
                return hi;
            }
            double f = (target - cdf[i - 1]) / Math.Max(cdf[i] - cdf[i - 1], double.Epsilon);
            return r[i - 1] + f * (r[i] - r[i - 1]);
        };
    }

    /// <summary>One chain of direct draws from the inverse-CDF table, resumable at every 4096th draw.</summary>
    private sealed class DirectChain(InverseCdfTable table, SamplingSettings settings, int chain, PairChainRecord record, ProgressReporter progress) : IResumableGroup
    {
        private RandomStream _random = RandomStream.ForChain(settings.Seed, chain);
        private long _done;

        public long ChainStepsDone => _done;

        internal ChainResult Run(GroupCheckpoints checkpoints, CancellationToken ct)
        {
            if (checkpoints.SavedState(chain) is byte[] saved)
            {
                var r = new StateReader(saved, "direct chain " + chain.ToString(CultureInfo.InvariantCulture));
                _random = RandomStream.FromState(r.Words("RAND", 4));
                _done = r.InRange(r.Longs("DONE", 1)[0], 0, settings.SamplesPerChain, "the draws done");
                record.Load(r);
                r.End();
            }
            var boundary = new ChunkBoundary([progress], checkpoints, chain, this, ct);
            long n = settings.SamplesPerChain;
            for (; _done < n; _done++)
            {
                if ((_done & 4095) == 0)
                {
                    boundary.Reached(_done);
                }
                record.Add(table.Draw(ref _random));
            }
            checkpoints.Finished(chain, this);
            progress.Finish();
            return new ChainResult(record, n, 0);
        }

        public void Save(StateWriter w)
        {
            Span<ulong> state = stackalloc ulong[4];
            _random.GetState(state);
            w.Words("RAND", state);
            w.Longs("DONE", [_done]);
            record.Save(w);
        }
    }
}

/// <summary>Everything a pair chain records per draw: blocked moments, histogram, batch means and retained draws.</summary>
internal sealed class PairChainRecord
{
    private BlockedMomentAccumulator _moments;
    private MomentAccumulator? _completed;

    internal PairChainRecord(BinCounter bins, BatchMeansStore store, DrawRecorder<double> draws)
    {
        Bins = bins;
        Store = store;
        Draws = draws;
    }

    internal BinCounter Bins { get; }

    internal BatchMeansStore Store { get; }

    internal DrawRecorder<double> Draws { get; }

    /// <summary>Merges a block of raw power sums about <paramref name="reference"/> (the lane kernels' moment path).</summary>
    internal void AddMomentBlock(int count, double reference, double s1, double s2, double s3, double s4)
        => _moments.AddBlock(count, reference, s1, s2, s3, s4);

    /// <summary>Writes the moments, batch means, histogram and retained draws.</summary>
    internal void Save(StateWriter w)
    {
        _moments.Save(w);
        Store.Save(w);
        Bins.Save(w);
        Draws.Save(w, 1);
    }

    /// <summary>Restores what <see cref="Save"/> wrote.</summary>
    internal void Load(StateReader r)
    {
        _moments.Load(r);
        Store.Load(r);
        Bins.Load(r);
        Draws.Load(r, 1);
    }

    /// <summary>The merged moments; read once the chain has finished.</summary>
    internal MomentAccumulator Moments => _completed ??= _moments.Complete();

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal void Add(double r)
    {
        _moments.Add(r);
        Bins.Add(r);
        Store.Add(r);
        Draws.Add(r);
    }
}

/// <summary>Throttled progress for one chain: about 200 reports over the chain (at most one per 4096 steps), plus one at the end.</summary>
internal sealed class ProgressReporter
{
    private readonly IProgress<SamplingProgress>? _sink;
    private readonly int _chain;
    private readonly long _total;
    private readonly double _temperature;
    private readonly long _interval;
    private long _last;

    internal ProgressReporter(IProgress<SamplingProgress>? sink, int chain, long total, double temperature)
    {
        _sink = sink;
        _chain = chain;
        _total = total;
        _temperature = temperature;
        _interval = Math.Max(total / 200, 4096);
        _last = -_interval; // so the first call (step 0) reports
    }

    /// <summary>Called by the loops every 4096 steps; forwards a report when enough steps have passed since the last one.</summary>
    internal void Report(long done)
    {
        if (_sink is not null && done - _last >= _interval)
        {
            _last = done;
            _sink.Report(new SamplingProgress(_chain, done, _total, _temperature));
        }
    }

    internal void Finish() => _sink?.Report(new SamplingProgress(_chain, _total, _total, _temperature));
}

/// <summary>Checks a list of temperatures.</summary>
internal static class TemperatureList
{
    internal const int MaximumCount = 100_000;

    internal static List<Temperature> Check(IEnumerable<Temperature> temperatures)
    {
        Preconditions.CheckNotNull(temperatures, nameof(temperatures));
        var list = new List<Temperature>();
        foreach (var t in temperatures)
        {
            Preconditions.CheckPositive(t.InKelvin, nameof(temperatures));
            list.Add(t);
            if (list.Count > MaximumCount)
            {
                throw new ArgumentException(string.Create(CultureInfo.InvariantCulture, $"temperatures has more than {MaximumCount} entries; split the sweep."), nameof(temperatures));
            }
        }
        if (list.Count == 0)
        {
            throw new ArgumentException("temperatures is empty; give at least one.", nameof(temperatures));
        }
        var duplicate = list.GroupBy(t => t.InKelvin).FirstOrDefault(g => g.Count() > 1);
        if (duplicate is not null)
        {
            throw new ArgumentException(string.Create(CultureInfo.InvariantCulture, $"temperatures contains {duplicate.Key:R} K more than once; each temperature must appear once."), nameof(temperatures));
        }
        return list;
    }
}
