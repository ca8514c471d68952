using System;
using System.Collections.Generic;
using System.Collections.Immutable;
using System.Globalization;
using System.Linq;
using System.Threading;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Reports;
using ThermalSampling.Sampling;
using ThermalSampling.Units;

namespace ThermalSampling.Cli;

/// <summary>The results of one scenario: pair reports or site reports, one per finished temperature.</summary>
/// <param name="Scenario">What was run.</param>
/// <param name="Pairs">Line or radial reports.</param>
/// <param name="Sites">Site reports.</param>
/// <param name="Cancelled">Whether the run was stopped before every temperature finished.</param>
/// <param name="Figures">Figure files written, if any were asked for.</param>
/// <param name="Checks">For <c>validate</c>: the warnings a run would give before sampling, with their temperature (K).</param>
internal sealed record ScenarioResults(Scenario Scenario, IReadOnlyList<PairVibrationReport> Pairs, IReadOnlyList<SiteVibrationReport> Sites, bool Cancelled = false,
    IReadOnlyList<string>? Figures = null, IReadOnlyList<(double Kelvin, Analysis.Warning Warning)>? Checks = null)
{
    /// <summary>For a surface: the site built and the frame its coordinates are in (every document states them).</summary>
    internal (string Site, string Frame)? Surface { get; init; }

    /// <summary>For <c>sweep --shard</c>: the part's records, one per temperature it has chains of.</summary>
    internal IReadOnlyList<TemperatureRecord>? Records { get; init; }

    /// <summary>With <c>sampling.reweightTo</c>: the pair estimates at the reweighting targets.</summary>
    internal IReadOnlyList<ReweightedPairEstimate>? PairReweighted { get; init; }

    /// <summary>With <c>sampling.reweightTo</c>: the site estimates at the reweighting targets.</summary>
    internal IReadOnlyList<ReweightedSiteEstimate>? SiteReweighted { get; init; }

    /// <summary>With <c>"method": "replica-exchange"</c> and <c>"ladder": "auto"</c>: the ladder chosen (its rungs, which were added, the predicted swap acceptances).</summary>
    internal Analysis.LadderPlan? Ladder { get; init; }

    /// <summary>With quantum statistics: the path-integral reports of the pairs (<see cref="Pairs"/> holds their <c>ToVibrationReport</c> forms).</summary>
    internal IReadOnlyList<PairPathIntegralReport>? PairQuantum { get; init; }

    /// <summary>With quantum statistics: the path-integral reports of the sites (<see cref="Sites"/> holds their <c>ToVibrationReport</c> forms).</summary>
    internal IReadOnlyList<SitePathIntegralReport>? SiteQuantum { get; init; }

    internal int Finished => Pairs.Count + Sites.Count;
}

/// <summary>Checkpointing of a CLI run: where to write, and the checkpoint to continue from (for <c>resume</c>).</summary>
/// <param name="Options">Where and how often to write.</param>
/// <param name="ResumeFrom">The checkpoint to continue from, or null to start afresh.</param>
internal sealed record CheckpointPlan(CheckpointOptions Options, SamplingCheckpoint? ResumeFrom);

/// <summary>Turns a validated scenario into library calls, specialised on the concrete potential type.</summary>
internal static class ScenarioRunner
{
    /// <summary>Builds everything a run builds and returns the warnings it would give before sampling (for <c>validate</c>); throws what a run would throw.</summary>
    internal static ScenarioResults Check(Scenario scenario) => Run(scenario, null, CancellationToken.None, checkOnly: true);

    /// <summary>
    /// Part <paramref name="index"/> of <paramref name="count"/> of the scenario's sweep: the (temperature, chain) pairs,
    /// temperature-major, split into <paramref name="count"/> contiguous blocks; this part samples its block's chains of
    /// each temperature it touches and returns their records.
    /// </summary>
    internal static IReadOnlyList<TemperatureRecord> RunShard(Scenario scenario, int index, int count, IProgress<SamplingProgress>? progress, CancellationToken ct)
        => Run(scenario, progress, ct, shard: (index, count)).Records!;

    /// <summary>The reports from merged records, one per temperature in the scenario's order.</summary>
    internal static ScenarioResults Summarise(Scenario scenario, IReadOnlyList<TemperatureRecord> records)
        => Run(scenario, null, CancellationToken.None, merged: records);

    /// <summary>The chain range of temperature <paramref name="t"/> in part <paramref name="index"/> of <paramref name="count"/>, or null when it has none.</summary>
    internal static ChainRange? ShardChains(int t, int temperatures, int chains, int index, int count)
    {
        long units = (long)temperatures * chains;
        long lo = units * (index - 1) / count, hi = units * index / count;
        long first = Math.Max(lo, (long)t * chains) - (long)t * chains, last = Math.Min(hi, (long)(t + 1) * chains) - (long)t * chains;
        return last > first ? new ChainRange((int)first, (int)(last - first)) : null;
    }

    internal static ScenarioResults Run(Scenario scenario, IProgress<SamplingProgress>? progress, CancellationToken ct, string? plotPath = null,
        CheckpointPlan? checkpoint = null, bool checkOnly = false, (int Index, int Count)? shard = null, IReadOnlyList<TemperatureRecord>? merged = null)
    {
        var job = new Job(progress, ct, plotPath, checkpoint, checkOnly, shard, merged);
        var p = scenario.Potential;
        return p.Form switch
        {
            "lennard-jones" => Dispatch(scenario, Make<LennardJones>(p, "$.potential"), job),
            "morse" => Dispatch(scenario, Make<Morse>(p, "$.potential"), job),
            "buckingham" => Dispatch(scenario, Make<Buckingham>(p, "$.potential"), job),
            "harmonic" => Dispatch(scenario, Make<HarmonicBond>(p, "$.potential"), job),
            "table" => Dispatch(scenario, Make<TabulatedPotential>(p, "$.potential"), job),
            "pairs" => DispatchPairs(scenario, job), // a structure with species pairs: the landscape carries each pair's potential
            _ => throw new ScenarioException(new[] { $"$.potential.form: '{p.Form}' is not a known form." }),
        };
    }

    private static T Guard<T>(Func<T> build, string path)
    {
        try
        {
            return build();
        }
        catch (ArgumentException ex)
        {
            throw new ScenarioException(new[] { $"{path}: {FirstSentences(ex.Message)}" });
        }
    }

    private static string FirstSentences(string message) => message.Split(" (Parameter '")[0];

    private static string LandscapePath(string? parameter) => parameter switch
    {
        "windowLower" or "windowUpper" or "window" => "$.landscape.window",
        "sites" => "$.landscape.sites",
        "facet" => "$.landscape.facet",
        "site" => "$.landscape.adsorptionSite",
        "layers" => "$.landscape.layers",
        _ when parameter?.StartsWith("sites[", StringComparison.Ordinal) == true => "$.landscape.sites",
        _ when parameter?.StartsWith("centre", StringComparison.Ordinal) == true => "$.landscape.centre",
        _ when parameter?.StartsWith("confinement", StringComparison.Ordinal) == true => "$.landscape.confinement",
        _ => "$.landscape",
    };

    private static LatticeKind Lattice(string name) => name switch
    {
        "fcc" => LatticeKind.FaceCentredCubic,
        "bcc" => LatticeKind.BodyCentredCubic,
        "sc" => LatticeKind.SimpleCubic,
        _ => LatticeKind.HexagonalClosePacked,
    };

    /// <summary>What a call of <see cref="Run"/> asks for: a run (with progress, figures, checkpoints), a check, one part of a sweep, or reports from merged records.</summary>
    private sealed record Job(IProgress<SamplingProgress>? Progress, CancellationToken Ct, string? PlotPath, CheckpointPlan? Checkpoint, bool CheckOnly,
        (int Index, int Count)? Shard, IReadOnlyList<TemperatureRecord>? Merged);

    /// <summary>The records of one part: each temperature's chains that fall in it, sampled by <paramref name="sample"/>.</summary>
    private static List<TemperatureRecord> Part(IReadOnlyList<Temperature> temperatures, int chains, (int Index, int Count) shard,
        Func<Temperature, ChainRange, TemperatureRecord> sample)
    {
        var records = new List<TemperatureRecord>();
        for (int t = 0; t < temperatures.Count; t++)
        {
            if (ShardChains(t, temperatures.Count, chains, shard.Index, shard.Count) is { } range)
            {
                records.Add(sample(temperatures[t], range));
            }
        }
        return records;
    }

    private static ScenarioResults Dispatch<TPotential>(Scenario scenario, TPotential potential, Job job)
        where TPotential : struct, IPairPotential
    {
        var (progress, ct, plotPath, checkpoint, checkOnly, shard, merged) = job;
        var l = scenario.Landscape;
        var mass = Mass.FromAtomicMassUnits(scenario.MassInAtomicMassUnits);
        var temperatures = scenario.TemperaturesInKelvin.Select(Temperature.FromKelvin).ToList();
        try
        {
            if (l.Kind is "line" or "radial")
            {
                var landscape = PairLandscape.Create(potential, l.Kind == "line" ? SeparationGeometry.Line : SeparationGeometry.Radial,
                    Length.FromAngstroms(l.WindowLower), Length.FromAngstroms(l.WindowUpper));
                if (checkOnly)
                {
                    return new ScenarioResults(scenario, [], [], Checks: temperatures.SelectMany(t => PairSampler.Check(landscape, mass, t).Select(w => (t.InKelvin, w))).ToList());
                }
                if (scenario.Quantum && !checkOnly)
                {
                    RefuseQuantumParts(shard, merged, checkpoint);
                    var quantum = new List<PairPathIntegralReport>();
                    bool stopped = RunEach(temperatures, t => quantum.Add(PathIntegralSampler.RunPair(landscape, mass, t, scenario.Sampling, scenario.Beads, progress, ct)));
                    var shown = quantum.Select(q => q.ToVibrationReport()).ToList();
                    var quantumFigures = plotPath is null ? null : Figures(() => FigureWriter.WritePairQuantum(quantum, landscape, plotPath, scenario.Title, FigureWriter.UnitsOf(scenario)));
                    return new ScenarioResults(scenario, shown, [], stopped, quantumFigures) { PairQuantum = quantum };
                }
                RefuseLadderParts(scenario, shard);
                if (shard is { } part)
                {
                    return new ScenarioResults(scenario, [], []) { Records = Part(temperatures, scenario.Sampling.Chains, part, (t, range) => PairSampler.Sample(landscape, t, scenario.Sampling, range, progress, ct)) };
                }
                if (merged is not null)
                {
                    return new ScenarioResults(scenario, [.. merged.Select(r => PairSampler.Summarise(landscape, mass, r))], [])
                    {
                        PairReweighted = scenario.ReweightTo is null ? null : Reweighted(() => Reweighting.Pair(landscape, merged, Targets(scenario))),
                    };
                }
                if (scenario.ReweightTo is not null)
                {
                    RefuseCheckpoint(checkpoint);
                    var (sampled, reweighted, stopped) = SampleAndReweight(temperatures,
                        t => PairSampler.Sample(landscape, t, scenario.Sampling, null, progress, ct), r => PairSampler.Summarise(landscape, mass, r),
                        records => Reweighting.Pair(landscape, records, Targets(scenario)));
                    var sampledFigures = plotPath is null ? null : Figures(() => FigureWriter.WritePair(sampled, landscape, plotPath, scenario.Title, FigureWriter.UnitsOf(scenario), reweighted));
                    return new ScenarioResults(scenario, sampled, [], stopped, sampledFigures) { PairReweighted = reweighted };
                }
                var ladder = scenario.Ladder == "auto" ? TemperatureLadders.ForPair(landscape, temperatures, scenario.TargetSwapAcceptance) : null;
                var rungs = ladder is null ? temperatures : [.. ladder.Temperatures];
                var reports = new List<PairVibrationReport>();
                bool cancelled = checkpoint is null
                    ? scenario.Ladder is null
                        ? RunEach(temperatures, t => reports.Add(PairSampler.Run(landscape, mass, t, scenario.Sampling, progress, ct)))
                        : RunAll(() => reports.AddRange(PairSampler.Sweep(landscape, mass, rungs, scenario.Sampling, progress, ct)))
                    : RunAll(() => reports.AddRange(checkpoint.ResumeFrom is null
                        ? PairSampler.SweepWithCheckpoints(landscape, mass, rungs, scenario.Sampling, checkpoint.Options, progress, ct)
                        : PairSampler.Resume(landscape, mass, rungs, scenario.Sampling, checkpoint.ResumeFrom, checkpoint.Options, progress, ct)));
                var figures = plotPath is null ? null : Figures(() => FigureWriter.WritePair(reports, landscape, plotPath, scenario.Title, FigureWriter.UnitsOf(scenario)));
                return new ScenarioResults(scenario, reports, Array.Empty<SiteVibrationReport>(), cancelled, figures) { Ladder = ladder };
            }
            var centre = l.Centre;
            SiteLandscape<TPotential> siteLandscape;
            (string Site, string Frame)? surface = null;
            if (l.Facet is { } facet)
            {
                // The slab reaches at least four neighbour distances, and far enough past the confinement that the
                // particle always has substrate beneath it (SiteLandscape.AboveSurface refuses anything less).
                var confinement = l.Confinement!.Value;
                double reach = confinement.Shape == ConfinementShape.Sphere ? confinement.SizeInAngstroms : confinement.SizeInAngstroms * Math.Sqrt(2);
                double lateral = Math.Clamp(reach / l.NearestNeighbourDistance + 2, 4, 20);
                var geometry = LatticeSites.Surface(Lattice(l.Lattice!), facet,
                    l.AdsorptionSite switch
                    {
                        "top" => AdsorptionSiteKind.Top,
                        "bridge" => AdsorptionSiteKind.Bridge,
                        "fcc-hollow" => AdsorptionSiteKind.FccHollow,
                        "hcp-hollow" => AdsorptionSiteKind.HcpHollow,
                        _ => AdsorptionSiteKind.Hollow,
                    },
                    Length.FromAngstroms(l.NearestNeighbourDistance), l.Layers, lateral);
                surface = (geometry.SiteDescription, geometry.Frame.Description + (l.Centre == Position.Origin ? "" : $"; everything shifted by the scenario's centre {l.Centre}"));
                siteLandscape = SiteLandscape.AboveSurface(potential, geometry with
                {
                    Sites = geometry.Sites.Select(s => s + l.Centre).ToImmutableArray(),
                    Start = geometry.Start + l.Centre,
                }, confinement);
            }
            else if (l.Pairs is not null)
            {
                siteLandscape = SpeciesLandscape<TPotential>(l);
            }
            else
            {
                siteLandscape = SiteLandscape.Create(potential, l.Lattice is not null
                    ? LatticeSites.NeighbourCage(Lattice(l.Lattice), Length.FromAngstroms(l.NearestNeighbourDistance), l.Shells).Select(s => s + l.Centre).ToImmutableArray()
                    : l.Sites, centre, l.Confinement!.Value);
            }
            if (l.CoulombField is { } coulomb)
            {
                siteLandscape = siteLandscape.WithField(coulomb); // the moving ion in the crystal's Ewald field
            }
            if (checkOnly)
            {
                return new ScenarioResults(scenario, [], [], Checks: temperatures.SelectMany(t => SiteSampler.Check(siteLandscape, mass, t).Select(w => (t.InKelvin, w))).ToList()) { Surface = surface };
            }
            if (scenario.Quantum)
            {
                RefuseQuantumParts(shard, merged, checkpoint);
                var quantum = new List<SitePathIntegralReport>();
                bool stopped = RunEach(temperatures, t => quantum.Add(PathIntegralSampler.RunSite(siteLandscape, mass, t, scenario.Sampling, scenario.Beads, progress, ct)));
                var shown = quantum.Select(q => q.ToVibrationReport()).ToList();
                var quantumFigures = plotPath is null ? null : Figures(() => FigureWriter.WriteSiteQuantum(quantum, plotPath, scenario.Title, FigureWriter.UnitsOf(scenario)));
                return new ScenarioResults(scenario, [], shown, stopped, quantumFigures) { Surface = surface, SiteQuantum = quantum };
            }
            RefuseLadderParts(scenario, shard);
            if (shard is { } sitePart)
            {
                return new ScenarioResults(scenario, [], []) { Records = Part(temperatures, scenario.Sampling.Chains, sitePart, (t, range) => SiteSampler.Sample(siteLandscape, t, scenario.Sampling, range, progress, ct)), Surface = surface };
            }
            if (merged is not null)
            {
                return new ScenarioResults(scenario, [], [.. merged.Select(r => SiteSampler.Summarise(siteLandscape, mass, r))])
                {
                    Surface = surface,
                    SiteReweighted = scenario.ReweightTo is null ? null : Reweighted(() => Reweighting.Site(siteLandscape, merged, Targets(scenario))),
                };
            }
            if (scenario.ReweightTo is not null)
            {
                RefuseCheckpoint(checkpoint);
                var (sampled, reweighted, stopped) = SampleAndReweight(temperatures,
                    t => SiteSampler.Sample(siteLandscape, t, scenario.Sampling, null, progress, ct), r => SiteSampler.Summarise(siteLandscape, mass, r),
                    records => Reweighting.Site(siteLandscape, records, Targets(scenario)));
                var sampledFigures = plotPath is null ? null : Figures(() => FigureWriter.WriteSite(sampled, plotPath, scenario.Title, FigureWriter.UnitsOf(scenario), reweighted));
                return new ScenarioResults(scenario, [], sampled, stopped, sampledFigures) { Surface = surface, SiteReweighted = reweighted };
            }
            var siteLadder = scenario.Ladder == "auto" ? TemperatureLadders.ForSite(siteLandscape, temperatures, scenario.TargetSwapAcceptance) : null;
            var siteRungs = siteLadder is null ? temperatures : [.. siteLadder.Temperatures];
            var siteReports = new List<SiteVibrationReport>();
            bool siteCancelled = checkpoint is null
                ? scenario.Ladder is null
                    ? RunEach(temperatures, t => siteReports.Add(SiteSampler.Run(siteLandscape, mass, t, scenario.Sampling, progress, ct)))
                    : RunAll(() => siteReports.AddRange(SiteSampler.Sweep(siteLandscape, mass, siteRungs, scenario.Sampling, progress, ct)))
                : RunAll(() => siteReports.AddRange(checkpoint.ResumeFrom is null
                    ? SiteSampler.SweepWithCheckpoints(siteLandscape, mass, siteRungs, scenario.Sampling, checkpoint.Options, progress, ct)
                    : SiteSampler.Resume(siteLandscape, mass, siteRungs, scenario.Sampling, checkpoint.ResumeFrom, checkpoint.Options, progress, ct)));
            var siteFigures = plotPath is null ? null : Figures(() => FigureWriter.WriteSite(siteReports, plotPath, scenario.Title, FigureWriter.UnitsOf(scenario)));
            return new ScenarioResults(scenario, Array.Empty<PairVibrationReport>(), siteReports, siteCancelled, siteFigures) { Surface = surface, Ladder = siteLadder };
        }
        catch (ArgumentException ex) when (ex is not ArgumentNullException)
        {
            throw new ScenarioException(new[] { $"{LandscapePath(ex.ParamName)}: {FirstSentences(ex.Message)}" });
        }
        catch (LandscapeException ex)
        {
            throw new ScenarioException(new[] { $"$.landscape: {ex.Message}" });
        }
    }

    /// <summary>
    /// Species pairs all of one form run on that form's own type (a species costs nothing then; several forms run on
    /// <see cref="PairForm"/>, which costs about a third more per step: docs/performance.md).
    /// </summary>
    private static ScenarioResults DispatchPairs(Scenario scenario, Job job)
    {
        var specs = scenario.Landscape.Pairs!.Values.ToList();
        if (specs.Count == 0)
        {
            throw new ScenarioException(new[] { "$.landscape.pairs: no pair involves a neighbour within the cutoff; nothing would act on the moving atom." });
        }
        var forms = specs.Select(p => p.Form).Distinct().ToList();
        string path = "$.landscape.pairs";
        return forms.Count > 1 ? Dispatch(scenario, PairForm.None, job) : forms[0] switch
        {
            "lennard-jones" => Dispatch(scenario, Make<LennardJones>(specs[0], path), job),
            "morse" => Dispatch(scenario, Make<Morse>(specs[0], path), job),
            "buckingham" => Dispatch(scenario, Make<Buckingham>(specs[0], path), job),
            _ => Dispatch(scenario, Make<HarmonicBond>(specs[0], path), job),
        };
    }

    /// <summary>
    /// A structure site with each neighbour species' own pair potential. Neighbours of a species with no pair (and no
    /// charge) feel nothing of the moving atom, so they are left out (validate lists them as acting not at all).
    /// </summary>
    private static SiteLandscape<TPotential> SpeciesLandscape<TPotential>(LandscapeSpec l) where TPotential : struct, IPairPotential
    {
        var acting = l.Sites.Zip(l.SiteSpecies).Where(s => l.Pairs!.ContainsKey(s.Second)).ToList();
        if (acting.Count == 0)
        {
            throw new ScenarioException(new[] { "$.landscape.pairs: no pair involves a neighbour within the cutoff; nothing would act on the moving atom." });
        }
        var potentials = acting.Select(site => site.Second).Distinct()
            .ToDictionary(species => species, species => Make<TPotential>(l.Pairs![species], $"$.landscape.pairs[{l.MovingSpecies}, {species}].potential"));
        return SiteLandscape.CreateWithSpecies(acting, potentials, l.Centre, l.Confinement!.Value, l.MixingRule);
    }

    /// <summary>The potential a spec names, as <typeparamref name="TPotential"/> (its own form's type, or <see cref="PairForm"/>).</summary>
    internal static TPotential Make<TPotential>(PotentialSpec p, string path) where TPotential : struct, IPairPotential
    {
        object made = Guard<object>(() => p.Form switch
        {
            "lennard-jones" => p.Parameters.ContainsKey("sigma")
                ? LennardJones.FromSigmaEpsilon(Length.FromAngstroms(p.Parameters["sigma"]), Energy.FromElectronVolts(p.Parameters["epsilon"]))
                : LennardJones.FromMinimum(Length.FromAngstroms(p.Parameters["equilibriumDistance"]), Energy.FromElectronVolts(p.Parameters["wellDepth"])),
            "morse" => new Morse(Energy.FromElectronVolts(p.Parameters["wellDepth"]), p.Parameters["width"], Length.FromAngstroms(p.Parameters["equilibriumDistance"])),
            "buckingham" => new Buckingham(Energy.FromElectronVolts(p.Parameters["A"]), Length.FromAngstroms(p.Parameters["rho"]), p.Parameters["C"]),
            "harmonic" => new HarmonicBond(p.Parameters["stiffness"], Length.FromAngstroms(p.Parameters["equilibriumDistance"])),
            "table" => new TabulatedPotential(p.TableR, p.TableEnergy),
            _ => throw new ScenarioException(new[] { $"{path}.form: '{p.Form}' is not a known form." }),
        }, path);
        if (typeof(TPotential) != typeof(PairForm))
        {
            return (TPotential)made;
        }
        object form = made switch
        {
            LennardJones lj => PairForm.From(lj),
            Morse morse => PairForm.From(morse),
            Buckingham buckingham => PairForm.From(buckingham),
            HarmonicBond harmonic => PairForm.From(harmonic),
            _ => throw new ScenarioException(new[] { $"{path}.form: '{p.Form}' cannot serve a species pair." }),
        };
        return (TPotential)form;
    }

    /// <summary>For validate and reports: how each neighbour species acts on the moving atom.</summary>
    internal static IEnumerable<string> PairSummary(LandscapeSpec l)
    {
        bool charged = l.Charges is not null && l.Charges.TryGetValue(l.MovingSpecies ?? "", out double q) && q != 0;
        string Coulomb(string species) => charged && l.Charges!.TryGetValue(species, out double other) && other != 0 ? " and Coulomb" : "";
        var species = l.Pairs is not null ? l.SiteSpecies.Distinct() : l.Charges?.Keys ?? [];
        foreach (var s in species)
        {
            string count = l.Pairs is null ? "" : $"{l.SiteSpecies.Count(x => x == s)} neighbours";
            if (l.Pairs is not null && l.Pairs.TryGetValue(s, out var spec))
            {
                yield return $"{l.MovingSpecies}–{s}: short-range {spec.Form}{(l.Mixed.Contains(s) ? $" ({l.MixingRule} mixing)" : "")}{Coulomb(s)} ({count})";
            }
            else if (Coulomb(s).Length > 0)
            {
                yield return $"{l.MovingSpecies}–{s}: Coulomb only{(count.Length > 0 ? $" ({count})" : "")}";
            }
            else if (l.Pairs is not null)
            {
                yield return $"{l.MovingSpecies}–{s}: not at all (no pair given, no charge; {count})";
            }
        }
        if (l.CoulombField is { } field)
        {
            yield return string.Create(CultureInfo.InvariantCulture, $"Coulomb: Ewald field of the whole crystal about the site, as a degree-{field.Degree} polynomial in a ball of {field.Radius:G3} Å (largest error against Ewald at check points {field.FitError:G2} eV)");
        }
    }

    /// <summary>
    /// Samples each temperature in turn, summarising each record as <c>Run</c> does (the same bits), then reweights every
    /// record onto the targets (not after a cancellation: the finished temperatures are reported alone).
    /// </summary>
    private static (List<TReport> Sampled, IReadOnlyList<TReweighted>? Reweighted, bool Stopped) SampleAndReweight<TReport, TReweighted>(
        IEnumerable<Temperature> temperatures, Func<Temperature, TemperatureRecord> sample, Func<TemperatureRecord, TReport> summarise,
        Func<List<TemperatureRecord>, ImmutableArray<TReweighted>> reweight)
    {
        var records = new List<TemperatureRecord>();
        var sampled = new List<TReport>();
        bool stopped = RunEach(temperatures, t =>
        {
            records.Add(sample(t));
            sampled.Add(summarise(records[^1]));
        });
        return (sampled, stopped ? null : Reweighted(() => reweight(records)), stopped);
    }

    private static IEnumerable<Temperature> Targets(Scenario scenario) => scenario.ReweightTargets.Select(Temperature.FromKelvin);

    /// <summary>Reweights; targets it cannot reach are an input error naming them and the overlap found (exit 2).</summary>
    private static IReadOnlyList<T> Reweighted<T>(Func<ImmutableArray<T>> reweight)
    {
        try
        {
            return reweight();
        }
        catch (ArgumentException ex) when (ex.ParamName == "targets")
        {
            throw new ScenarioException(new[] { "$.sampling.reweightTo: " + FirstSentences(ex.Message) });
        }
    }

    private static void RefuseCheckpoint(CheckpointPlan? checkpoint)
    {
        if (checkpoint is not null)
        {
            throw new ScenarioException(new[] { "$.sampling.reweightTo: a reweighted run cannot yet be checkpointed; run it without --checkpoint, or shard it (sweep --shard) and reweight at 'merge'." });
        }
    }

    /// <summary>A replica-exchange ladder runs its temperatures together: one process, not shards of temperatures and chains.</summary>
    private static void RefuseLadderParts(Scenario scenario, (int Index, int Count)? shard)
    {
        if (scenario.Ladder is not null && shard is not null)
        {
            throw new ScenarioException(new[] { "$.sampling.method: a replica-exchange ladder runs all its temperatures together and cannot be split into shards; run it whole (it is one job of a job array), or give each ladder its own scenario." });
        }
    }

    /// <summary>Quantum runs are three runs per temperature (classical, P and P/2 beads): not yet sharded, merged or checkpointed.</summary>
    private static void RefuseQuantumParts((int Index, int Count)? shard, IReadOnlyList<TemperatureRecord>? merged, CheckpointPlan? checkpoint)
    {
        if (shard is not null || merged is not null || checkpoint is not null)
        {
            throw new ScenarioException(new[] { "$.statistics: quantum runs cannot yet be split into shards, merged, checkpointed or resumed; run the scenario whole (one process per temperature list), or split its temperatures into several scenarios." });
        }
    }

    /// <summary>Draws the figures; a failure there is the drawing's, not the scenario's (exit 1 with the reason, not a JSON path).</summary>
    private static List<string> Figures(Func<List<string>> draw)
    {
        try
        {
            return draw();
        }
        catch (ArgumentException ex)
        {
            throw new InvalidOperationException("the figures could not be drawn: " + ex.Message, ex);
        }
    }

    /// <summary>Runs a checkpointed sweep; a cancellation leaves its state in the checkpoint (and no reports).</summary>
    private static bool RunAll(Action run)
    {
        try
        {
            run();
            return false;
        }
        catch (OperationCanceledException)
        {
            return true;
        }
    }

    /// <summary>Runs one temperature after another; a cancellation keeps the finished ones and reports that it happened.</summary>
    private static bool RunEach(IEnumerable<Temperature> temperatures, Action<Temperature> run)
    {
        foreach (var t in temperatures)
        {
            try
            {
                run(t);
            }
            catch (OperationCanceledException)
            {
                return true;
            }
        }
        return false;
    }

}
