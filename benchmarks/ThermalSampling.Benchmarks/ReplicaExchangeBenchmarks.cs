using System.Linq;
using BenchmarkDotNet.Attributes;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Sampling;
using ThermalSampling.Units;

namespace ThermalSampling.Benchmarks;

/// <summary>
/// What replica exchange costs per chain-step (target: at most 10 % over independent chains at the same temperatures):
/// eight temperatures from 10 to 40 K, four chains each, 5 000 burn-in and 50 000 recorded steps, one thread and four
/// chains per vector for both, so the difference is the lockstep advance and the swaps; sampling only (the summaries are
/// the same work for both, and are left out). Invented landscapes: a
/// Lennard-Jones line (15 meV at 3.5 Å on [3.0, 5.0] Å), the cheapest step there is, and a particle in a cage of twelve
/// such neighbours (fcc, 3.5 Å; a 1.2 Å sphere). Baseline: the same sweep without swaps, in the same run.
/// </summary>
[MemoryDiagnoser]
public class ReplicaExchangeBenchmarks
{
    /// <summary>"line" or "site".</summary>
    [Params("line", "site")]
    public string Landscape { get; set; } = "line";

    /// <summary>Steps between swap attempts.</summary>
    [Params(10, 100)]
    public int SwapInterval { get; set; }

    /// <summary>
    /// The batch means kept per chain and value (16 384, the default, makes a batch of four draws in these 50 000-draw
    /// chains: every rung's stores, 16 MB for the line's 32 chains, are alive at once).
    /// </summary>
    [Params(1024, 16384)]
    public int DiagnosticValues { get; set; }

    private LadderWorkload _work = null!;

    /// <summary>Plans every temperature's chains.</summary>
    [GlobalSetup]
    public void Setup() => _work = new LadderWorkload(Landscape, 50_000, DiagnosticValues);

    /// <summary>
    /// Eight independent runs, one temperature after another, every record kept to the end: the same output and the same
    /// memory as the ladder's (which returns every rung's record), so the comparison is the work per chain-step.
    /// </summary>
    [Benchmark(Baseline = true)]
    public long IndependentChains() => _work.IndependentChains();

    /// <summary>
    /// The same independent runs with each record dropped as soon as its temperature is done (as a sweep that summarises
    /// one temperature at a time can): only one temperature's records are alive at once, so the garbage collector hands
    /// the same large arrays back to the next temperature instead of committing fresh memory.
    /// </summary>
    [Benchmark]
    public long IndependentChainsDroppingRecords() => _work.IndependentChainsDroppingRecords();

    /// <summary>The same chains as one ladder with swaps.</summary>
    [Benchmark]
    public long ReplicaExchange() => _work.ReplicaExchange(SwapInterval);
}

/// <summary>
/// The line of <see cref="ReplicaExchangeBenchmarks"/> with ten times the steps (500 000 recorded per chain) at the
/// default 16 384 batch means and swap interval 100: the records are as large as in the short run (the cap), so what
/// holding every rung's records at once costs is spread over ten times the chain-steps.
/// </summary>
[MemoryDiagnoser]
public class ReplicaExchangeLongChainBenchmarks
{
    private LadderWorkload _work = null!;

    /// <summary>Plans every temperature's chains.</summary>
    [GlobalSetup]
    public void Setup() => _work = new LadderWorkload("line", 500_000, 16384);

    /// <summary>Independent runs, every record kept (the baseline, as in <see cref="ReplicaExchangeBenchmarks"/>).</summary>
    [Benchmark(Baseline = true)]
    public long IndependentChains() => _work.IndependentChains();

    /// <summary>Independent runs, each temperature's records dropped when it is done.</summary>
    [Benchmark]
    public long IndependentChainsDroppingRecords() => _work.IndependentChainsDroppingRecords();

    /// <summary>The ladder, swapping every 100 steps.</summary>
    [Benchmark]
    public long ReplicaExchange() => _work.ReplicaExchange(100);
}

/// <summary>The ladder benchmarks' chains: eight temperatures, each planned as a sweep plans it (rung k on streams k·C + c), so every method times sampling only.</summary>
internal sealed class LadderWorkload
{
    private static readonly LennardJones Pair = LennardJones.FromMinimum(Length.FromAngstroms(3.5), Energy.FromElectronVolts(0.015));
    private static readonly PairLandscape<LennardJones> Line = PairLandscape.Line(Pair, Length.FromAngstroms(3.0), Length.FromAngstroms(5.0));
    private static readonly SiteLandscape<LennardJones> Cage = SiteLandscape.Create(Pair,
        LatticeSites.NeighbourCage(LatticeKind.FaceCentredCubic, Length.FromAngstroms(3.5)), Position.Origin, Confinement.Sphere(Length.FromAngstroms(1.2)));
    private static readonly Temperature[] Ladder = [.. Enumerable.Range(0, 8).Select(i => Temperature.FromKelvin(10 * System.Math.Pow(4, i / 7.0)))];
    private static readonly Mass Mass = Mass.FromAtomicMassUnits(50);

    private readonly SamplingSettings _settings;
    private readonly TemperaturePlan[] _plans;
    private readonly double[] _betas;

    internal LadderWorkload(string landscape, long samples, int diagnosticValues)
    {
        var settings = _settings = new SamplingSettings
        {
            Seed = 1, Chains = 4, SamplesPerChain = samples, BurnIn = 5_000, MaxThreads = 1, ChainsPerVector = 4, MaxDiagnosticValuesPerChain = diagnosticValues,
        };
        _betas = [.. Ladder.Select(t => 1 / t.ThermalEnergyInElectronVolts)];
        _plans = [.. Ladder.Select((t, k) =>
        {
            int offset = TemperatureLadder.StreamOffset(k, settings.Chains);
            if (landscape == "line")
            {
                var references = Reports.PairSummary.Analyse(Line, Mass, t);
                return PairChains.Plan(Line, references.Exact, references.Well!.EquilibriumDistanceInAngstroms, references.Harmonic!.ClassicalRmsInAngstroms,
                    PairSampler.DefaultTargetAcceptance, t, settings, null, streamOffset: offset);
            }
            var harmonic = Analysis.SiteAnalysis.Harmonic(Cage, Mass, t);
            return SiteChains.Plan(Cage, harmonic, SiteSampler.DefaultTargetAcceptance, t, settings, null, streamOffset: offset);
        })];
    }

    internal long IndependentChains()
    {
        var records = _plans.Select(p => p.Run(ChainRange.All(4), null, 0, default)).ToArray();
        return records.Sum(r => r.Chains.Sum(c => c.Accepted));
    }

    internal long IndependentChainsDroppingRecords() => _plans.Sum(p => p.Run(ChainRange.All(4), null, 0, default).Chains.Sum(c => c.Accepted));

    internal long ReplicaExchange(int interval)
        => TemperatureLadder.RunPlans(_plans, _betas, _settings with { SwapInterval = interval }, null, default).Records.Sum(r => r.Chains.Sum(c => c.Accepted));
}
