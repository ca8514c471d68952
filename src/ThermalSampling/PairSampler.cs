using System;
using System.Collections.Generic;
using System.Collections.Immutable;
using System.Linq;
using System.Threading;
using ThermalSampling.Analysis;
using ThermalSampling.Landscapes;
using ThermalSampling.Persistence;
using ThermalSampling.Potentials;
using ThermalSampling.Reports;
using ThermalSampling.Sampling;
using ThermalSampling.Units;

namespace ThermalSampling;

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
        RunArguments.CheckOneTemperature(settings);
        return RunOne(landscape, mass, temperature, settings, progress, cancellationToken, null, 0);
    }

    /// <summary>
    /// Everything a run at <paramref name="temperature"/> would check or warn about before sampling, without sampling: the
    /// analyses run (and throw as the run would, for example <see cref="LandscapeException"/> for a site that is no
    /// minimum) and the warnings that need no draws are returned, in the order the run's report lists them.
    /// </summary>
    /// <typeparam name="TPotential">The potential type.</typeparam>
    /// <param name="landscape">The landscape.</param>
    /// <param name="mass">The particle's mass.</param>
    /// <param name="temperature">The temperature.</param>
    public static ImmutableArray<Warning> Check<TPotential>(PairLandscape<TPotential> landscape, Mass mass, Temperature temperature)
        where TPotential : struct, IPairPotential
    {
        Internal.Preconditions.CheckNotNull(landscape, nameof(landscape));
        PairAnalysis.CheckArguments(mass, temperature);
        return PairSummary.Check(landscape, mass, temperature);
    }

    /// <summary>
    /// Samples without summarising: the records of every chain at <paramref name="temperature"/>, which
    /// <see cref="Summarise{TPotential}"/> turns into the report <see cref="Run{TPotential}"/> would give (the same bits).
    /// A part of the run's chains (<paramref name="chains"/>) can be sampled on its own, in another process or on another
    /// machine, and the parts merged.
    /// Records can be written to a file, read back and merged (<see cref="TemperatureRecord"/>).
    /// </summary>
    /// <typeparam name="TPotential">The potential type.</typeparam>
    /// <param name="landscape">The landscape.</param>
    /// <param name="temperature">The temperature.</param>
    /// <param name="settings">The sampling settings.</param>
    /// <param name="chains">The part of the run to sample (default: every chain); parts sampled apart merge with <see cref="TemperatureRecord.Merge"/>.</param>
    /// <param name="progress">Optional progress sink.</param>
    /// <param name="cancellationToken">Optional cancellation.</param>
    public static TemperatureRecord Sample<TPotential>(PairLandscape<TPotential> landscape, Temperature temperature, SamplingSettings settings,
        ChainRange? chains = null, IProgress<SamplingProgress>? progress = null, CancellationToken cancellationToken = default)
        where TPotential : struct, IPairPotential
    {
        var range = RunArguments.CheckPart(landscape, settings, temperature, chains);
        // The plan uses only the mass-free parts of the analyses (the exact distribution, the well, the classical spread).
        return SampleOne(landscape, PairSummary.Analyse(landscape, RunArguments.NominalMass, temperature), temperature, settings, progress, cancellationToken, null, 0, range);
    }

    /// <summary>The report of a complete record from <see cref="Sample{TPotential}"/> (or merged parts of one), with the analyses at <paramref name="mass"/>.</summary>
    /// <typeparam name="TPotential">The potential type.</typeparam>
    /// <param name="landscape">The landscape the record was sampled in.</param>
    /// <param name="mass">The particle's mass (for the harmonic and validity analyses).</param>
    /// <param name="record">Every chain's record of one temperature.</param>
    /// <exception cref="ArgumentException">When the record comes from another landscape or lacks chains.</exception>
    public static PairVibrationReport Summarise<TPotential>(PairLandscape<TPotential> landscape, Mass mass, TemperatureRecord record)
        where TPotential : struct, IPairPotential
    {
        RunArguments.CheckRecord(landscape, record, "pair", () => PairChains.Fingerprint(landscape), mass);
        return PairSummary.Summarise(landscape, mass, record.Temperature, record.Settings, PairSummary.Analyse(landscape, mass, record.Temperature), record);
    }

    /// <summary>Analyse, sample, summarise: the three steps of one temperature.</summary>
    private static PairVibrationReport RunOne<TPotential>(PairLandscape<TPotential> landscape, Mass mass, Temperature temperature, SamplingSettings settings,
        IProgress<SamplingProgress>? progress, CancellationToken cancellationToken, CheckpointSession? session, int temperatureIndex)
        where TPotential : struct, IPairPotential
    {
        var references = PairSummary.Analyse(landscape, mass, temperature);
        var run = SampleOne(landscape, references, temperature, settings, progress, cancellationToken, session, temperatureIndex, ChainRange.All(settings.Chains));
        return PairSummary.Summarise(landscape, mass, temperature, settings, references, run);
    }

    /// <summary>The sampling step: the plan (target acceptance, first width, batch reference) from the exact distribution, then the chains.</summary>
    private static TemperatureRecord SampleOne<TPotential>(PairLandscape<TPotential> landscape, PairSummary.References references, Temperature temperature,
        SamplingSettings settings, IProgress<SamplingProgress>? progress, CancellationToken cancellationToken, CheckpointSession? session, int temperatureIndex,
        ChainRange range)
        where TPotential : struct, IPairPotential
        => PlanOne(landscape, references, temperature, settings, progress, 0).Run(range, session, temperatureIndex, cancellationToken);

    /// <summary>The plan of one temperature's chains (target acceptance, first width, batch reference from the exact distribution).</summary>
    private static TemperaturePlan PlanOne<TPotential>(PairLandscape<TPotential> landscape, PairSummary.References references, Temperature temperature,
        SamplingSettings settings, IProgress<SamplingProgress>? progress, int streamOffset)
        where TPotential : struct, IPairPotential
    {
        double target = settings.TargetAcceptance ?? DefaultTargetAcceptance;
        double width0 = settings.InitialStepWidthInAngstroms ?? references.Harmonic?.ClassicalRmsInAngstroms ?? landscape.WindowWidthInAngstroms / 10;
        width0 = Math.Min(width0, landscape.WindowWidthInAngstroms);
        return PairChains.Plan(landscape, references.Exact, references.Well?.EquilibriumDistanceInAngstroms ?? references.Exact.MeanInAngstroms, width0, target,
            temperature, settings, progress, streamOffset: streamOffset);
    }

    /// <summary>Every temperature of <paramref name="list"/> as one replica-exchange ladder: rung k's chains draw from streams k·C + c; each rung summarised as a plain run, with its swaps.</summary>
    private static ImmutableArray<PairVibrationReport> RunLadder<TPotential>(PairLandscape<TPotential> landscape, Mass mass, List<Temperature> list,
        SamplingSettings settings, IProgress<SamplingProgress>? progress, CancellationToken cancellationToken, CheckpointSession? session)
        where TPotential : struct, IPairPotential
    {
        var references = list.Select(t => PairSummary.Analyse(landscape, mass, t)).ToArray();
        return Sweeps.RunLadder(list, settings, session, cancellationToken, (k, offset) => PlanOne(landscape, references[k], list[k], settings, progress, offset),
            (k, record, swaps) =>
            {
                var report = PairSummary.Summarise(landscape, mass, list[k], settings, references[k], record);
                return report with { Diagnostics = report.Diagnostics with { ReplicaExchange = swaps }, Warnings = LadderSummary.Warnings(report.Warnings, swaps) };
            });
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
        => Sweeps.Plain(landscape, mass, temperatures, settings, t => Run(landscape, mass, t, settings, progress, cancellationToken), Identity,
            (list, session) => RunLadder(landscape, mass, list, settings, progress, cancellationToken, session));

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
        => Sweeps.WithCheckpoints(landscape, mass, temperatures, settings, checkpoints, Identity,
            (list, session, t) => RunOne(landscape, mass, list[t], settings, progress, cancellationToken, session, t),
            (list, session) => RunLadder(landscape, mass, list, settings, progress, cancellationToken, session));

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
        => Sweeps.Resume(landscape, mass, temperatures, settings, checkpoint, checkpoints, Identity,
            (list, session, t) => RunOne(landscape, mass, list[t], settings, progress, cancellationToken, session, t),
            (list, session) => RunLadder(landscape, mass, list, settings, progress, cancellationToken, session));

    private static SweepIdentity Identity<TPotential>(PairLandscape<TPotential> landscape, Mass mass, List<Temperature> list, SamplingSettings settings)
        where TPotential : struct, IPairPotential
        => CheckpointedSweep.Identity("pair", landscape.Description, PairChains.Fingerprint(landscape), mass, list, settings);
}
