using System;
using System.Collections.Generic;
using System.Collections.Immutable;
using System.Linq;
using ThermalSampling.Internal;
using ThermalSampling.Persistence;
using ThermalSampling.Sampling;
using ThermalSampling.Units;

namespace ThermalSampling;

/// <summary>
/// The temperature loops every sampler shares: a plain sweep, a checkpointed sweep and its resumption. A sampler supplies
/// its identity (what a checkpoint must match) and its run of one temperature; nothing here knows pairs from sites.
/// </summary>
internal static class Sweeps
{
    /// <summary>What a checkpoint of a sweep over <paramref name="temperatures"/> of <paramref name="landscape"/> must match.</summary>
    internal delegate SweepIdentity IdentityOf<TLandscape>(TLandscape landscape, Mass mass, List<Temperature> temperatures, SamplingSettings settings);

    /// <summary>Temperature t of the checked list, run inside the session.</summary>
    internal delegate TReport RunOneOf<TReport>(List<Temperature> temperatures, CheckpointSession session, int t);

    /// <summary>Each temperature in turn, as independent runs with the same settings.</summary>
    internal static ImmutableArray<TReport> Plain<TReport>(IEnumerable<Temperature> temperatures, Func<Temperature, TReport> run)
        => TemperatureList.Check(temperatures).Select(run).ToImmutableArray();

    /// <summary>A sweep that writes checkpoints as <paramref name="checkpoints"/> says.</summary>
    internal static ImmutableArray<TReport> WithCheckpoints<TLandscape, TReport>(TLandscape landscape, Mass mass, IEnumerable<Temperature> temperatures,
        SamplingSettings settings, CheckpointOptions checkpoints, IdentityOf<TLandscape> identityOf, RunOneOf<TReport> runOne)
        where TLandscape : class
    {
        Preconditions.CheckNotNull(checkpoints, nameof(checkpoints));
        var (list, identity) = Prepare(landscape, mass, temperatures, settings, identityOf);
        int lanes = settings.Method == SamplingMethod.Metropolis
            ? LaneGroups.ChooseLanes(settings.Chains, settings.MaxThreads ?? Environment.ProcessorCount, settings.ChainsPerVector) : 1;
        var session = new CheckpointSession(identity, checkpoints, null, lanes);
        return CheckpointedSweep.Run(list.Count, session, t => runOne(list, session, t));
    }

    /// <summary>Finishes the sweep that wrote <paramref name="checkpoint"/>, after checking that it belongs to this one.</summary>
    internal static ImmutableArray<TReport> Resume<TLandscape, TReport>(TLandscape landscape, Mass mass, IEnumerable<Temperature> temperatures,
        SamplingSettings settings, SamplingCheckpoint checkpoint, CheckpointOptions? checkpoints, IdentityOf<TLandscape> identityOf, RunOneOf<TReport> runOne)
        where TLandscape : class
    {
        Preconditions.CheckNotNull(checkpoint, nameof(checkpoint));
        var (list, identity) = Prepare(landscape, mass, temperatures, settings, identityOf);
        checkpoint.CheckBelongsTo(identity);
        var session = new CheckpointSession(identity, checkpoints, checkpoint, checkpoint.ChainsPerVector);
        return CheckpointedSweep.Run(list.Count, session, t => runOne(list, session, t));
    }

    private static (List<Temperature> List, SweepIdentity Identity) Prepare<TLandscape>(TLandscape landscape, Mass mass, IEnumerable<Temperature> temperatures,
        SamplingSettings settings, IdentityOf<TLandscape> identityOf)
        where TLandscape : class
    {
        var list = TemperatureList.Check(temperatures);
        foreach (var t in list)
        {
            RunArguments.Check(landscape, settings, mass, t);
        }
        return (list, identityOf(landscape, mass, list, settings));
    }
}
