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

/// <summary>How chains are packed into lane groups.</summary>
internal static class LaneGroups
{
    /// <summary>The widest lane count worth using: a power of two no larger than the hardware's vector and no larger than the chains each thread gets.</summary>
    internal static int ChooseLanes(int chains, int threads, int? requested)
    {
        if (requested is int r)
        {
            return r;
        }
        int hardware = Vector512.IsHardwareAccelerated ? 8 : Vector256.IsHardwareAccelerated ? 4 : Vector128.IsHardwareAccelerated ? 2 : 1;
        int perThread = Math.Max(1, chains / Math.Max(1, threads));
        int lanes = 1;
        while (lanes * 2 <= Math.Min(hardware, perThread))
        {
            lanes *= 2;
        }
        return lanes;
    }
}
