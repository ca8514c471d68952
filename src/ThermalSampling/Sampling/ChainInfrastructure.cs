using System.Runtime.Intrinsics;
using System;
using System.Collections.Generic;
using System.Collections.Immutable;
using System.Globalization;
using System.Linq;
using System.Runtime.InteropServices;
using System.Threading;
using System.Threading.Tasks;
using ThermalSampling.Persistence;
using ThermalSampling.Analysis;
using ThermalSampling.Randomness;
using ThermalSampling.Statistics;

namespace ThermalSampling.Sampling;

/// <summary>The argument checks every sampler entry point makes, in one place.</summary>
internal static class RunArguments
{
    internal static void Check(object landscape, SamplingSettings settings, Units.Mass mass, Units.Temperature temperature)
    {
        Internal.Preconditions.CheckNotNull(landscape, nameof(landscape));
        Internal.Preconditions.CheckNotNull(settings, nameof(settings));
        settings.Validate();
        PairAnalysis.CheckArguments(mass, temperature);
    }

    /// <summary>Refuses settings that ask for replica exchange in a call that samples one temperature.</summary>
    internal static void CheckOneTemperature(SamplingSettings settings)
    {
        if (settings is { SwapInterval: int interval })
        {
            throw new ArgumentException(string.Create(CultureInfo.InvariantCulture,
                $"settings.SwapInterval = {interval} asks for replica exchange, which runs a ladder of temperatures together: call Sweep (or SweepWithCheckpoints) with at least two temperatures, or leave SwapInterval null."), nameof(settings));
        }
    }

    /// <summary>The mass the argument checks take where sampling needs none (classical sampling does not depend on the mass).</summary>
    internal static readonly Units.Mass NominalMass = Units.Mass.FromAtomicMassUnits(1);

    /// <summary>The checks of a <c>Sample</c> call; returns the chains to sample (every chain when <paramref name="chains"/> is null).</summary>
    internal static ChainRange CheckPart(object landscape, SamplingSettings settings, Units.Temperature temperature, ChainRange? chains)
    {
        Check(landscape, settings, NominalMass, temperature);
        CheckOneTemperature(settings);
        var range = chains ?? ChainRange.All(settings.Chains);
        range.Check(settings.Chains, nameof(chains));
        return range;
    }

    /// <summary>The checks of a <c>Summarise</c> call: the record is complete and comes from a <paramref name="kind"/> landscape with <paramref name="fingerprint"/>.</summary>
    internal static void CheckRecord(object landscape, TemperatureRecord record, string kind, Func<string> fingerprint, Units.Mass mass)
    {
        Internal.Preconditions.CheckNotNull(landscape, nameof(landscape));
        Internal.Preconditions.CheckNotNull(record, nameof(record));
        record.CheckSummarisable(kind, fingerprint(), nameof(record));
        PairAnalysis.CheckArguments(mass, record.Temperature);
    }
}

/// <summary>Runs chains in parallel; results land in chain order, so they never depend on the thread count.</summary>
internal static class ChainScheduler
{
    internal static T[] RunAll<T>(int chains, int? maxThreads, CancellationToken cancellationToken, Func<int, T> runChain)
    {
        var results = new T[chains];
        var options = new ParallelOptions
        {
            MaxDegreeOfParallelism = maxThreads ?? Environment.ProcessorCount,
            CancellationToken = cancellationToken,
        };
        try
        {
            Parallel.For(0, chains, options, c => results[c] = runChain(c));
        }
        catch (AggregateException ex) when (ex.InnerExceptions.Count > 0)
        {
            // Surface the first chain's own exception (a NaN energy, a cancellation) rather than a wrapper.
            System.Runtime.ExceptionServices.ExceptionDispatchInfo.Capture(ex.InnerExceptions[0]).Throw();
            throw;
        }
        return results;
    }
}

/// <summary>
/// Chains <see cref="First"/> to <see cref="First"/> + <see cref="Count"/> − 1 of a run: a part of it that can be sampled
/// on its own (every chain draws the same bits whichever part it is sampled in) and merged with the others
/// (<see cref="TemperatureRecord.Merge"/>).
/// </summary>
/// <param name="First">The first chain, 0 to the run's chain count − 1.</param>
/// <param name="Count">How many chains, at least 1, ending at or before the run's last chain.</param>
public readonly record struct ChainRange(int First, int Count)
{
    /// <summary>Every chain of a run with <paramref name="chains"/> chains.</summary>
    /// <param name="chains">The run's chain count.</param>
    public static ChainRange All(int chains) => new(0, chains);

    /// <summary>Throws unless the range lies within a run of <paramref name="chains"/> chains.</summary>
    internal void Check(int chains, string parameter)
    {
        if (First < 0 || Count < 1 || (long)First + Count > chains)
        {
            throw new ArgumentOutOfRangeException(parameter, string.Create(CultureInfo.InvariantCulture,
                $"The chain range starts at {First} and holds {Count}; valid: at least one chain, within the run's {chains} (0 to {chains - 1})."));
        }
    }
}

/// <summary>The one driver of a temperature's chains: lane groups for Metropolis walks, one task per chain for direct draws.</summary>
internal static class ChainRuns
{
    /// <summary>A lane group of the chains from <c>firstChain</c> (padding lanes at or beyond <c>end</c> are dropped).</summary>
    internal delegate ChainRecord[] LaneGroup(int lanes, int firstChain, int end, GroupCheckpoints checkpoints, int group);

    /// <summary>
    /// Runs the chains of <paramref name="range"/> in chain order, on <see cref="SamplingSettings.MaxThreads"/> threads
    /// (the results never depend on it), with the session's checkpoints when there is one.
    /// </summary>
    internal static ChainRecord[] Run(SamplingSettings settings, ChainRange range, CheckpointSession? session, int temperatureIndex, CancellationToken ct,
        LaneGroup laneGroup, Func<int, GroupCheckpoints, ChainRecord> direct)
    {
        ChainRecord[] results;
        int end = range.First + range.Count;
        if (settings.Method == SamplingMethod.Metropolis)
        {
            int lanes = session?.Lanes ?? LaneGroups.ChooseLanes(range.Count, settings.MaxThreads ?? Environment.ProcessorCount, settings.ChainsPerVector);
            int groupCount = (range.Count + lanes - 1) / lanes;
            var checkpoints = session?.Begin(temperatureIndex, groupCount) ?? GroupCheckpoints.None;
            results = ChainScheduler.RunAll(groupCount, settings.MaxThreads, ct, g => laneGroup(lanes, range.First + g * lanes, end, checkpoints, g))
                .SelectMany(g => g).ToArray();
        }
        else
        {
            var checkpoints = session?.Begin(temperatureIndex, range.Count) ?? GroupCheckpoints.None;
            results = ChainScheduler.RunAll(range.Count, settings.MaxThreads, ct, i => direct(range.First + i, checkpoints));
        }
        session?.End(temperatureIndex);
        return results;
    }
}

/// <summary>
/// One temperature's chains planned but not yet run: run them as one temperature (<see cref="Run"/>), or build their lane
/// groups for a temperature ladder (<see cref="BuildGroup"/>) and turn the finished records into the temperature's record
/// (<see cref="Finish"/>).
/// </summary>
/// <param name="settings">The run's settings.</param>
/// <param name="laneGroup">Builds the lane group of chains first … end − 1 at a lane width (Metropolis), or null for direct draws.</param>
/// <param name="direct">Runs one chain of direct draws, or null for Metropolis.</param>
/// <param name="finish">The temperature's record from its chains' records in chain order.</param>
internal sealed class TemperaturePlan(SamplingSettings settings, TemperaturePlan.GroupBuilder? laneGroup,
    Func<int, GroupCheckpoints, CancellationToken, ChainRecord>? direct, Func<ChainRecord[], TemperatureRecord> finish)
{
    /// <summary>Builds the lane group of chains <c>first</c> … <c>end</c> − 1 at <c>lanes</c> lanes (group index <c>group</c> in the checkpoints).</summary>
    internal delegate LaneGroup GroupBuilder(int lanes, int first, int end, GroupCheckpoints checkpoints, int group, CancellationToken ct);

    /// <summary>Runs the chains of <paramref name="range"/> as one temperature.</summary>
    internal TemperatureRecord Run(ChainRange range, CheckpointSession? session, int temperatureIndex, CancellationToken ct)
        => finish(ChainRuns.Run(settings, range, session, temperatureIndex, ct,
            (lanes, first, end, checkpoints, g) => laneGroup!(lanes, first, end, checkpoints, g, ct).Run(),
            (c, checkpoints) => direct!(c, checkpoints, ct)));

    /// <summary>The lane group of chains <paramref name="first"/> … <paramref name="end"/> − 1, with no checkpoints or cancellation of its own (a ladder handles both).</summary>
    internal LaneGroup BuildGroup(int lanes, int first, int end, int group)
        => (laneGroup ?? throw new InvalidOperationException("Direct sampling has no lane groups."))(lanes, first, end, GroupCheckpoints.None, group, CancellationToken.None);

    /// <summary>The temperature's record from every chain's record, in chain order.</summary>
    internal TemperatureRecord Finish(ChainRecord[] records) => finish(records);
}

/// <summary>What a direct sampler draws: one independent draw into the record, with its proposals and acceptances counted there.</summary>
internal interface IDirectSource
{
    /// <summary>Draws once from <paramref name="random"/> and adds the draw to <paramref name="record"/>.</summary>
    void Draw(ref RandomStream random, ChainRecord record);

    /// <summary>After the last draw: what the record takes from its sums once the chain is done.</summary>
    void Finish(ChainRecord record);
}

/// <summary>
/// One chain of independent draws from <typeparamref name="TSource"/> (a struct, so the draw inlines into the loop),
/// resumable at every 4096th draw: the one driver of the direct samplers. Its checkpoint is the stream (RAND), the
/// draws done (DONE) and the record.
/// </summary>
/// <param name="source">What the draws come from.</param>
/// <param name="settings">The run's settings (seed, draws per chain).</param>
/// <param name="chain">The chain's index.</param>
/// <param name="record">The chain's record.</param>
/// <param name="progress">The chain's progress.</param>
/// <param name="what">The chain's kind in messages ("direct chain", "direct site chain"), followed by its index.</param>
internal sealed class DirectChain<TSource>(TSource source, SamplingSettings settings, int chain, ChainRecord record, ProgressReporter progress, string what) : IResumableGroup
    where TSource : struct, IDirectSource
{
    private RandomStream _random = RandomStream.ForChain(settings.Seed, chain);
    private long _done;

    public long ChainStepsDone => _done;

    internal ChainRecord Run(GroupCheckpoints checkpoints, CancellationToken ct)
    {
        if (checkpoints.SavedState(chain) is byte[] saved)
        {
            var r = new StateReader(saved, what + " " + chain.ToString(CultureInfo.InvariantCulture));
            _random = RandomStream.FromState(r.Words("RAND", 4));
            _done = r.InRange(r.Longs("DONE", 1)[0], 0, settings.SamplesPerChain, "the draws done");
            record.Load(r);
            r.InRange(record.Draws, _done, _done, "the record's draws");
            r.End();
        }
        var boundary = new ChunkBoundary([progress], checkpoints, chain, this, ct);
        for (long n = settings.SamplesPerChain; _done < n; _done++)
        {
            if ((_done & 4095) == 0)
            {
                boundary.Reached(_done);
            }
            source.Draw(ref _random, record);
        }
        source.Finish(record);
        checkpoints.Finished(chain, this);
        progress.Finish();
        Span<ulong> words = stackalloc ulong[4];
        _random.GetState(words);
        record.SetStreamState(words);
        return record;
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
