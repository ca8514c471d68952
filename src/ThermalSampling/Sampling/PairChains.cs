using System;
using System.Collections.Generic;
using System.Globalization;
using System.Linq;
using System.Runtime.CompilerServices;
using System.Threading;
using ThermalSampling.Analysis;
using ThermalSampling.Internal;
using ThermalSampling.Landscapes;
using ThermalSampling.Persistence;
using ThermalSampling.Potentials;
using ThermalSampling.Randomness;
using ThermalSampling.Statistics;
using ThermalSampling.Units;

namespace ThermalSampling.Sampling;

/// <summary>
/// The pair sampling step: runs the chains of one temperature (Metropolis walks on the lane engine, or direct
/// inverse-CDF draws) and returns their records. It builds no report: <c>Reports.PairSummary</c> does that.
/// </summary>
internal static class PairChains
{
    /// <summary>Runs the chains of <paramref name="range"/> at one temperature (<see cref="Plan"/>'s arguments).</summary>
    internal static TemperatureRecord Sample<TPotential>(PairLandscape<TPotential> landscape, ExactPairDistribution exact, double reference, double initialWidth,
        double targetAcceptance, Temperature temperature, SamplingSettings settings, IProgress<SamplingProgress>? progress, CancellationToken cancellationToken,
        CheckpointSession? session, int temperatureIndex, ChainRange range, RingPlan? ring = null)
        where TPotential : struct, IPairPotential
        => Plan(landscape, exact, reference, initialWidth, targetAcceptance, temperature, settings, progress, ring)
            .Run(range, session, temperatureIndex, cancellationToken);

    /// <summary>Plans every chain of <paramref name="settings"/> at one temperature.</summary>
    /// <param name="landscape">The landscape.</param>
    /// <param name="exact">Its exact distribution at the temperature (for starts and direct draws).</param>
    /// <param name="reference">The batch means' reference point (the minimum, else the exact mean).</param>
    /// <param name="initialWidth">The first proposal width, Å.</param>
    /// <param name="targetAcceptance">The Metropolis target acceptance.</param>
    /// <param name="temperature">The temperature.</param>
    /// <param name="settings">The settings.</param>
    /// <param name="progress">Optional progress sink.</param>
    /// <param name="ring">The ring polymer of a path integral (each chain a ring of its beads), or null for classical chains.</param>
    /// <param name="streamOffset">Chain c draws from stream <paramref name="streamOffset"/> + c of the seed (a ladder's rungs use disjoint streams).</param>
    internal static TemperaturePlan Plan<TPotential>(PairLandscape<TPotential> landscape, ExactPairDistribution exact, double reference, double initialWidth,
        double targetAcceptance, Temperature temperature, SamplingSettings settings, IProgress<SamplingProgress>? progress, RingPlan? ring = null, int streamOffset = 0)
        where TPotential : struct, IPairPotential
    {
        bool metropolis = settings.Method == SamplingMethod.Metropolis;
        var table = metropolis ? null : InverseCdfTable.Build(exact);
        int chains = settings.Chains;
        var quantile = metropolis ? StartQuantiles(exact) : null;
        var layout = new RecordLayout(1, settings.SamplesPerChain, settings.MaxDiagnosticValuesPerChain, settings.RetainedDrawsPerChain, [reference],
            exact.ReferenceEnergyInElectronVolts, landscape.WindowLowerInAngstroms, landscape.WindowUpperInAngstroms, settings.HistogramBins,
            [.. SettingsFields.Waves(settings)], null);
        double binWidth = EnergyHistogram.BinWidthFor(temperature.ThermalEnergyInElectronVolts);
        ChainRecord NewRecord(int c) => new(layout, c, binWidth);
        ProgressReporter NewReporter(int c) => new(progress, c, (metropolis ? settings.BurnIn : 0) + settings.SamplesPerChain, temperature.InKelvin);

        double Start(int c) => quantile!(chains == 1 ? 0.5 : 0.01 + 0.98 * c / (chains - 1));
        PairLaneChains.Plan<TPotential>? plan = metropolis ? new(landscape.Potential, landscape.WindowLowerInAngstroms, landscape.WindowUpperInAngstroms,
            1 / temperature.ThermalEnergyInElectronVolts, landscape.Geometry == SeparationGeometry.Radial, initialWidth, targetAcceptance,
            landscape.WindowWidthInAngstroms, settings.BurnIn, settings.SamplesPerChain, settings.Seed, StreamOffset: streamOffset) : null;
        return new TemperaturePlan(settings,
            metropolis ? (lanes, first, end, checkpoints, g, ct) => ring is null
                ? PairLaneChains.Build(lanes, plan!, first, end, Start, NewRecord, NewReporter, checkpoints, g, ct)
                : PairLaneChains.BuildRing(lanes, plan!, ring, first, end, Start, NewRecord, NewReporter, checkpoints, g, ct) : null,
            metropolis ? null : (c, checkpoints, ct) => new DirectChain<TableDraws<TPotential>>(new(table!, landscape.Potential), settings, c, NewRecord(c), NewReporter(c), "direct chain").Run(checkpoints, ct),
            results => new TemperatureRecord("pair", landscape.Description, Fingerprint(landscape), temperature, settings, targetAcceptance, 1, layout, [.. results],
                Internal.LibraryVersion.Current));
    }

    /// <summary>The geometry, the exact window and the energies at 257 evenly spaced separations in it.</summary>
    internal static string Fingerprint<TPotential>(PairLandscape<TPotential> landscape) where TPotential : struct, IPairPotential
    {
        double lo = landscape.WindowLowerInAngstroms, hi = landscape.WindowUpperInAngstroms;
        var values = new List<double> { landscape.Geometry == SeparationGeometry.Line ? 0 : 1, lo, hi };
        for (int i = 0; i <= 256; i++)
        {
            values.Add(landscape.Potential.Energy(lo + (hi - lo) * i / 256));
        }
        return SweepIdentity.FingerprintOf(values);
    }

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

    /// <summary>Direct draws of a pair's separation from the inverse-CDF table, each with its energy.</summary>
    private readonly struct TableDraws<TPotential>(InverseCdfTable table, TPotential potential) : IDirectSource
        where TPotential : struct, IPairPotential
    {
        public void Draw(ref RandomStream random, ChainRecord record)
        {
            double r = table.Draw(ref random);
            record.AddSeparation(r, potential.Energy(r)); // a struct call the JIT inlines; the draw lies where the table's density is finite
            record.Proposals++;
            record.Accepted++;
        }

        /// <summary>Nothing: a pair's record keeps no sums to finish.</summary>
        public void Finish(ChainRecord record)
        {
        }
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
