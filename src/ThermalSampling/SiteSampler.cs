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
/// Samples the position of a particle among fixed sites at one temperature and returns the vibration report: mean
/// vector, displacement covariance, MSD and B with error bars, the harmonic reference and warnings.
/// </summary>
/// <remarks>
/// Metropolis proposals follow the harmonic covariance's shape; chains start over-dispersed at about two harmonic
/// standard deviations from the minimum. Direct sampling draws from a Gaussian envelope with the harmonic covariance
/// inflated by 1.3² and accepts with probability p/(M q); M is found by probing 40 000 points (half from the envelope,
/// half uniform in the confinement) and 2 000 on its boundary, plus a 5% margin on the log scale. A draw that exceeds the
/// bound during sampling, or an acceptance below 0.1%, stops the run with an error that says to use Metropolis.
/// A cancelled run throws <see cref="OperationCanceledException"/>.
/// </remarks>
public static class SiteSampler
{
    /// <summary>The default Metropolis target acceptance for three coordinates (Roberts, Gelman &amp; Gilks 1997 and
    /// Roberts &amp; Rosenthal 2001 give 0.44 for one coordinate and 0.234 as the high-dimensional limit; 0.31 for d = 3 is recalled from memory).</summary>
    public const double DefaultTargetAcceptance = 0.31;

    /// <summary>Runs the sampler.</summary>
    /// <typeparam name="TPotential">The potential type.</typeparam>
    /// <param name="landscape">The landscape.</param>
    /// <param name="mass">The particle's mass.</param>
    /// <param name="temperature">The temperature.</param>
    /// <param name="settings">The sampling settings.</param>
    /// <param name="progress">Optional progress sink.</param>
    /// <param name="cancellationToken">Optional cancellation.</param>
    /// <exception cref="LandscapeException">When there is no bound minimum in the confinement.</exception>
    /// <exception cref="InvalidOperationException">When direct sampling cannot establish a valid envelope bound.</exception>
    public static SiteVibrationReport Run<TPotential>(SiteLandscape<TPotential> landscape, Mass mass, Temperature temperature, SamplingSettings settings,
        IProgress<SamplingProgress>? progress = null, CancellationToken cancellationToken = default)
        where TPotential : struct, IPairPotential
    {
        RunArguments.Check(landscape, settings, mass, temperature);
        RunArguments.CheckOneTemperature(settings);
        return RunOne(landscape, mass, temperature, settings, progress, cancellationToken, null, 0);
    }

    /// <inheritdoc cref="PairSampler.Check{TPotential}(PairLandscape{TPotential}, Mass, Temperature)"/>
    public static ImmutableArray<Warning> Check<TPotential>(SiteLandscape<TPotential> landscape, Mass mass, Temperature temperature)
        where TPotential : struct, IPairPotential
    {
        Internal.Preconditions.CheckNotNull(landscape, nameof(landscape));
        PairAnalysis.CheckArguments(mass, temperature);
        return SiteSummary.Check(landscape, mass, temperature);
    }

    /// <inheritdoc cref="PairSampler.Sample{TPotential}(PairLandscape{TPotential}, Temperature, SamplingSettings, ChainRange?, IProgress{SamplingProgress}?, CancellationToken)"/>
    /// <exception cref="LandscapeException">When there is no bound minimum in the confinement.</exception>
    public static TemperatureRecord Sample<TPotential>(SiteLandscape<TPotential> landscape, Temperature temperature, SamplingSettings settings,
        ChainRange? chains = null, IProgress<SamplingProgress>? progress = null, CancellationToken cancellationToken = default)
        where TPotential : struct, IPairPotential
    {
        var range = RunArguments.CheckPart(landscape, settings, temperature, chains);
        // The plan uses only the classical (mass-free) parts of the harmonic analysis: the minimum and the covariance.
        var harmonic = SiteAnalysis.Harmonic(landscape, RunArguments.NominalMass, temperature);
        return SiteChains.Sample(landscape, harmonic, settings.TargetAcceptance ?? DefaultTargetAcceptance, temperature, settings, progress, cancellationToken, null, 0,
            range);
    }

    /// <inheritdoc cref="PairSampler.Summarise{TPotential}(PairLandscape{TPotential}, Mass, TemperatureRecord)"/>
    public static SiteVibrationReport Summarise<TPotential>(SiteLandscape<TPotential> landscape, Mass mass, TemperatureRecord record)
        where TPotential : struct, IPairPotential
    {
        RunArguments.CheckRecord(landscape, record, "sites", () => SiteChains.Fingerprint(landscape), mass);
        return SiteSummary.Summarise(landscape, mass, record.Temperature, record.Settings, SiteAnalysis.Harmonic(landscape, mass, record.Temperature), record);
    }

    /// <summary>Analyse, sample, summarise: the three steps of one temperature.</summary>
    private static SiteVibrationReport RunOne<TPotential>(SiteLandscape<TPotential> landscape, Mass mass, Temperature temperature, SamplingSettings settings,
        IProgress<SamplingProgress>? progress, CancellationToken cancellationToken, CheckpointSession? session, int temperatureIndex)
        where TPotential : struct, IPairPotential
    {
        var harmonic = SiteAnalysis.Harmonic(landscape, mass, temperature);
        var run = SiteChains.Sample(landscape, harmonic, settings.TargetAcceptance ?? DefaultTargetAcceptance, temperature, settings, progress, cancellationToken,
            session, temperatureIndex, ChainRange.All(settings.Chains));
        return SiteSummary.Summarise(landscape, mass, temperature, settings, harmonic, run);
    }

    /// <summary>Every temperature of <paramref name="list"/> as one replica-exchange ladder (<see cref="PairSampler"/>'s ladder, about each rung's harmonic estimate).</summary>
    private static ImmutableArray<SiteVibrationReport> RunLadder<TPotential>(SiteLandscape<TPotential> landscape, Mass mass, List<Temperature> list,
        SamplingSettings settings, IProgress<SamplingProgress>? progress, CancellationToken cancellationToken, CheckpointSession? session)
        where TPotential : struct, IPairPotential
    {
        var harmonics = list.Select(t => SiteAnalysis.Harmonic(landscape, mass, t)).ToArray();
        return Sweeps.RunLadder(list, settings, session, cancellationToken,
            (k, offset) => SiteChains.Plan(landscape, harmonics[k], settings.TargetAcceptance ?? DefaultTargetAcceptance, list[k], settings, progress, streamOffset: offset),
            (k, record, swaps) =>
            {
                var report = SiteSummary.Summarise(landscape, mass, list[k], settings, harmonics[k], record);
                return report with { Diagnostics = report.Diagnostics with { ReplicaExchange = swaps }, Warnings = LadderSummary.Warnings(report.Warnings, swaps) };
            });
    }

    /// <inheritdoc cref="PairSampler.Sweep{TPotential}(PairLandscape{TPotential}, Mass, IEnumerable{Temperature}, SamplingSettings, IProgress{SamplingProgress}?, CancellationToken)"/>
    public static ImmutableArray<SiteVibrationReport> Sweep<TPotential>(SiteLandscape<TPotential> landscape, Mass mass, IEnumerable<Temperature> temperatures,
        SamplingSettings settings, IProgress<SamplingProgress>? progress = null, CancellationToken cancellationToken = default)
        where TPotential : struct, IPairPotential
        => Sweeps.Plain(landscape, mass, temperatures, settings, t => Run(landscape, mass, t, settings, progress, cancellationToken), Identity,
            (list, session) => RunLadder(landscape, mass, list, settings, progress, cancellationToken, session));

    /// <inheritdoc cref="PairSampler.SweepWithCheckpoints{TPotential}(PairLandscape{TPotential}, Mass, IEnumerable{Temperature}, SamplingSettings, CheckpointOptions, IProgress{SamplingProgress}?, CancellationToken)"/>
    public static ImmutableArray<SiteVibrationReport> SweepWithCheckpoints<TPotential>(SiteLandscape<TPotential> landscape, Mass mass, IEnumerable<Temperature> temperatures,
        SamplingSettings settings, CheckpointOptions checkpoints, IProgress<SamplingProgress>? progress = null, CancellationToken cancellationToken = default)
        where TPotential : struct, IPairPotential
        => Sweeps.WithCheckpoints(landscape, mass, temperatures, settings, checkpoints, Identity,
            (list, session, t) => RunOne(landscape, mass, list[t], settings, progress, cancellationToken, session, t),
            (list, session) => RunLadder(landscape, mass, list, settings, progress, cancellationToken, session));

    /// <inheritdoc cref="PairSampler.Resume{TPotential}(PairLandscape{TPotential}, Mass, IEnumerable{Temperature}, SamplingSettings, SamplingCheckpoint, CheckpointOptions?, IProgress{SamplingProgress}?, CancellationToken)"/>
    public static ImmutableArray<SiteVibrationReport> Resume<TPotential>(SiteLandscape<TPotential> landscape, Mass mass, IEnumerable<Temperature> temperatures,
        SamplingSettings settings, SamplingCheckpoint checkpoint, CheckpointOptions? checkpoints = null, IProgress<SamplingProgress>? progress = null,
        CancellationToken cancellationToken = default)
        where TPotential : struct, IPairPotential
        => Sweeps.Resume(landscape, mass, temperatures, settings, checkpoint, checkpoints, Identity,
            (list, session, t) => RunOne(landscape, mass, list[t], settings, progress, cancellationToken, session, t),
            (list, session) => RunLadder(landscape, mass, list, settings, progress, cancellationToken, session));

    private static SweepIdentity Identity<TPotential>(SiteLandscape<TPotential> landscape, Mass mass, List<Temperature> list, SamplingSettings settings)
        where TPotential : struct, IPairPotential
        => CheckpointedSweep.Identity("sites", landscape.Description, SiteChains.Fingerprint(landscape), mass, list, settings);
}
