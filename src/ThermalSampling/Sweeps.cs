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

    /// <summary>Every temperature of the checked list as one replica-exchange ladder, inside the session (null: no checkpoints).</summary>
    internal delegate ImmutableArray<TReport> LadderOf<TReport>(List<Temperature> temperatures, CheckpointSession? session);

    /// <summary>Each temperature in turn, as independent runs with the same settings, or as one ladder when the settings ask for swaps.</summary>
    internal static ImmutableArray<TReport> Plain<TLandscape, TReport>(TLandscape landscape, Mass mass, IEnumerable<Temperature> temperatures, SamplingSettings settings,
        Func<Temperature, TReport> run, IdentityOf<TLandscape> identityOf, LadderOf<TReport> ladder)
        where TLandscape : class
        => settings is { SwapInterval: not null }
            ? Ladder(landscape, mass, temperatures, settings, null, null, identityOf, ladder)
            : TemperatureList.Check(temperatures).Select(run).ToImmutableArray();

    /// <summary>A sweep that writes checkpoints as <paramref name="checkpoints"/> says.</summary>
    internal static ImmutableArray<TReport> WithCheckpoints<TLandscape, TReport>(TLandscape landscape, Mass mass, IEnumerable<Temperature> temperatures,
        SamplingSettings settings, CheckpointOptions checkpoints, IdentityOf<TLandscape> identityOf, RunOneOf<TReport> runOne, LadderOf<TReport> ladder)
        where TLandscape : class
    {
        Preconditions.CheckNotNull(checkpoints, nameof(checkpoints));
        if (settings is { SwapInterval: not null })
        {
            return Ladder(landscape, mass, temperatures, settings, checkpoints, null, identityOf, ladder);
        }
        var (list, identity) = Prepare(landscape, mass, temperatures, settings, identityOf);
        int lanes = settings.Method == SamplingMethod.Metropolis
            ? LaneGroups.ChooseLanes(settings.Chains, settings.MaxThreads ?? Environment.ProcessorCount, settings.ChainsPerVector) : 1;
        var session = new CheckpointSession(identity, checkpoints, null, lanes);
        return CheckpointedSweep.Run(list.Count, session, t => runOne(list, session, t));
    }

    /// <summary>Finishes the sweep that wrote <paramref name="checkpoint"/>, after checking that it belongs to this one.</summary>
    internal static ImmutableArray<TReport> Resume<TLandscape, TReport>(TLandscape landscape, Mass mass, IEnumerable<Temperature> temperatures,
        SamplingSettings settings, SamplingCheckpoint checkpoint, CheckpointOptions? checkpoints, IdentityOf<TLandscape> identityOf, RunOneOf<TReport> runOne,
        LadderOf<TReport> ladder)
        where TLandscape : class
    {
        Preconditions.CheckNotNull(checkpoint, nameof(checkpoint));
        if (settings is { SwapInterval: not null })
        {
            return Ladder(landscape, mass, temperatures, settings, checkpoints, checkpoint, identityOf, ladder);
        }
        var (list, identity) = Prepare(landscape, mass, temperatures, settings, identityOf);
        checkpoint.CheckBelongsTo(identity);
        var session = new CheckpointSession(identity, checkpoints, checkpoint, checkpoint.ChainsPerVector);
        return CheckpointedSweep.Run(list.Count, session, t => runOne(list, session, t));
    }

    /// <summary>
    /// The sweep as one replica-exchange ladder: checked (at least two temperatures, increasing), then run whole, with
    /// checkpoints when <paramref name="checkpoints"/> or <paramref name="resumeFrom"/> is given (a cancelled ladder writes
    /// its last checkpoint before the exception reaches the caller).
    /// </summary>
    private static ImmutableArray<TReport> Ladder<TLandscape, TReport>(TLandscape landscape, Mass mass, IEnumerable<Temperature> temperatures,
        SamplingSettings settings, CheckpointOptions? checkpoints, SamplingCheckpoint? resumeFrom, IdentityOf<TLandscape> identityOf, LadderOf<TReport> ladder)
        where TLandscape : class
    {
        var (list, identity) = Prepare(landscape, mass, temperatures, settings, identityOf);
        TemperatureLadder.CheckLadder([.. list.Select(t => t.InKelvin)], nameof(temperatures));
        if (checkpoints is null && resumeFrom is null)
        {
            return ladder(list, null);
        }
        resumeFrom?.CheckBelongsTo(identity);
        var session = new CheckpointSession(identity, checkpoints, resumeFrom, resumeFrom?.ChainsPerVector ?? TemperatureLadder.Lanes(settings));
        try
        {
            return ladder(list, session);
        }
        catch (OperationCanceledException)
        {
            session.SaveAfterCancellation();
            throw;
        }
    }

    /// <summary>
    /// Every temperature of <paramref name="list"/> as one replica-exchange ladder: rung k planned by
    /// <paramref name="plan"/>(k, its stream offset k·C), the rungs run together with swaps, and each rung's record
    /// summarised by <paramref name="summarise"/>(k, record, its swap diagnostics).
    /// </summary>
    internal static ImmutableArray<TReport> RunLadder<TReport>(List<Temperature> list, SamplingSettings settings, CheckpointSession? session,
        System.Threading.CancellationToken ct, Func<int, int, TemperaturePlan> plan, Func<int, TemperatureRecord, Reports.ReplicaExchangeDiagnostics, TReport> summarise)
    {
        var plans = list.Select((_, k) => plan(k, TemperatureLadder.StreamOffset(k, settings.Chains))).ToArray();
        var (records, tallies) = TemperatureLadder.RunPlans(plans, [.. list.Select(t => 1 / t.ThermalEnergyInElectronVolts)], settings, session, ct);
        ImmutableArray<double> ladder = [.. list.Select(t => t.InKelvin)];
        return [.. list.Select((_, k) => summarise(k, records[k], Reports.LadderSummary.Diagnostics(k, ladder, tallies)))];
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
