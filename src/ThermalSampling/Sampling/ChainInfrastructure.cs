using System.Runtime.Intrinsics;
using System;
using System.Collections.Generic;
using System.Collections.Immutable;
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
