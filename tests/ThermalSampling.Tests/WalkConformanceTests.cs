using System;
using System.Collections.Generic;
using System.Collections.Immutable;
using System.IO;
using System.Linq;
using MathNet.Numerics.Distributions;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Sampling;
using ThermalSampling.Testing;
using ThermalSampling.Units;
using Xunit;

namespace ThermalSampling.Tests;

/// <summary>
/// What every walk on the lane engine must do, checked for each walk listed in <see cref="Walks"/>: the same bits at every
/// lane width and thread count; a checkpoint taken anywhere resumes to the uninterrupted bits; and, on a landscape whose
/// distribution is known in closed form, draws that pass a Kolmogorov–Smirnov test against it. A new kind of chain is
/// listed once here and gets all of it.
/// </summary>
public class WalkConformanceTests
{
    private static readonly Mass Mass12 = Mass.FromAtomicMassUnits(12);
    private static readonly ImmutableArray<Temperature> TwoTemperatures = [Temperature.FromKelvin(40), Temperature.FromKelvin(90)];

    /// <summary>One walk under test: a sweep, a checkpointed sweep and a resume, each returning the reports' bits.</summary>
    /// <remarks>Parts: the reports' bits when each temperature's chains are sampled in two parts (chains 0–1 and 2 on), each
    /// written to a record file and read back, merged and summarised.</remarks>
    internal sealed record Walk(string Name, Func<SamplingSettings, string> Sweep, Func<SamplingSettings, CheckpointTests.Keeper, string> SweepWithCheckpoints,
        Func<SamplingSettings, SamplingCheckpoint, string> Resume, Func<SamplingSettings, string> Parts);

    /// <summary>A record written to a record file and read back.</summary>
    internal static TemperatureRecord ThroughFile(TemperatureRecord record)
    {
        var bytes = new MemoryStream();
        record.WriteTo(bytes);
        return TemperatureRecord.ReadFrom(new MemoryStream(bytes.ToArray()));
    }

    /// <summary>Each temperature sampled as two parts that travel through record files, merged (given in reverse order) and summarised.</summary>
    private static string InParts<TReport>(SamplingSettings s, Func<Temperature, ChainRange, TemperatureRecord> sample, Func<TemperatureRecord, TReport> summarise,
        Func<TReport, string> bits)
        => string.Join("\n", TwoTemperatures.Select(t => bits(summarise(TemperatureRecord.Merge(
            [ThroughFile(sample(t, new ChainRange(2, s.Chains - 2))), ThroughFile(sample(t, new ChainRange(0, 2)))])))));

    // Invented landscapes: a Lennard-Jones pair (well 10 meV at 3.5 Å) on a line and radially, and a particle in the cage of
    // twelve such neighbours 3.5 Å away (the fcc nearest-neighbour shell).
    private static readonly LennardJones Pair = InventedLandscapes.Pair;
    private static readonly PairLandscape<LennardJones> Line = PairLandscape.Line(Pair, Length.FromAngstroms(3.0), Length.FromAngstroms(5.5));
    private static readonly PairLandscape<LennardJones> Radial = PairLandscape.Radial(Pair, Length.FromAngstroms(3.0), Length.FromAngstroms(5.5));
    private static readonly SiteLandscape<LennardJones> Cage = InventedLandscapes.Cage;

    internal static readonly IReadOnlyDictionary<string, Walk> Walks = new Dictionary<string, Walk>
    {
        ["pair-line"] = new("pair-line",
            s => string.Join("\n", PairSampler.Sweep(Line, Mass12, TwoTemperatures, s).Select(CheckpointTests.Bits)),
            (s, k) => string.Join("\n", PairSampler.SweepWithCheckpoints(Line, Mass12, TwoTemperatures, s, k.Options(TimeSpan.Zero)).Select(CheckpointTests.Bits)),
            (s, c) => string.Join("\n", PairSampler.Resume(Line, Mass12, TwoTemperatures, s, c).Select(CheckpointTests.Bits)),
            s => InParts(s, (t, r) => PairSampler.Sample(Line, t, s, r), rec => PairSampler.Summarise(Line, Mass12, rec), CheckpointTests.Bits)),
        ["pair-radial"] = new("pair-radial",
            s => string.Join("\n", PairSampler.Sweep(Radial, Mass12, TwoTemperatures, s).Select(CheckpointTests.Bits)),
            (s, k) => string.Join("\n", PairSampler.SweepWithCheckpoints(Radial, Mass12, TwoTemperatures, s, k.Options(TimeSpan.Zero)).Select(CheckpointTests.Bits)),
            (s, c) => string.Join("\n", PairSampler.Resume(Radial, Mass12, TwoTemperatures, s, c).Select(CheckpointTests.Bits)),
            s => InParts(s, (t, r) => PairSampler.Sample(Radial, t, s, r), rec => PairSampler.Summarise(Radial, Mass12, rec), CheckpointTests.Bits)),
        ["site"] = new("site",
            s => string.Join("\n", SiteSampler.Sweep(Cage, Mass12, TwoTemperatures, s).Select(CheckpointTests.Bits)),
            (s, k) => string.Join("\n", SiteSampler.SweepWithCheckpoints(Cage, Mass12, TwoTemperatures, s, k.Options(TimeSpan.Zero)).Select(CheckpointTests.Bits)),
            (s, c) => string.Join("\n", SiteSampler.Resume(Cage, Mass12, TwoTemperatures, s, c).Select(CheckpointTests.Bits)),
            s => InParts(s, (t, r) => SiteSampler.Sample(Cage, t, s, r), rec => SiteSampler.Summarise(Cage, Mass12, rec), CheckpointTests.Bits)),
    };

    public static TheoryData<string> WalkNames => new(Walks.Keys);

    private static SamplingSettings Settings(int? lanes, int threads) => new()
    {
        Seed = 4242, Chains = 5, SamplesPerChain = 9000, BurnIn = 5000, ChainsPerVector = lanes, MaxThreads = threads,
        MaxDiagnosticValuesPerChain = 1000, RetainedDrawsPerChain = 100,
        ScatteringVectorsInInverseAngstroms = [2.5, 7.0, -4.0], // three q for a pair, one vector for a site: the temperature-factor sums travel too
    };

    [Theory]
    [MemberData(nameof(WalkNames))]
    public void SameBitsAtEveryLaneWidthAndThreadCount(string walk)
    {
        var w = Walks[walk];
        string reference = w.Sweep(Settings(1, 1));
        foreach (var (lanes, threads) in new (int?, int)[] { (2, 1), (4, 2), (8, 1), (8, 2), (null, 2) })
        {
            Assert.True(reference == w.Sweep(Settings(lanes, threads)), $"{walk}: {lanes} lanes on {threads} threads differ from 1 lane on 1 thread");
        }
    }

    /// <summary>Records: parts of a run sampled apart (here each at its own lane width), saved and read back, merge to the one-process bits.</summary>
    [Theory]
    [MemberData(nameof(WalkNames))]
    public void PartsSampledApartMergeToTheSameBits(string walk)
    {
        var w = Walks[walk];
        Assert.Equal(w.Sweep(Settings(null, 2)), w.Parts(Settings(null, 1)));
        Assert.Equal(w.Sweep(Settings(null, 2) with { Method = SamplingMethod.Direct }), w.Parts(Settings(null, 2) with { Method = SamplingMethod.Direct }));
    }

    [Theory]
    [MemberData(nameof(WalkNames))]
    public void ResumingAnyCheckpointGivesTheUninterruptedBits(string walk)
    {
        var w = Walks[walk];
        var settings = Settings(4, 2);
        string reference = w.Sweep(settings);
        var keeper = new CheckpointTests.Keeper();
        Assert.Equal(reference, w.SweepWithCheckpoints(settings, keeper));
        Assert.True(keeper.Saved.Count >= 4, $"{walk}: only {keeper.Saved.Count} checkpoints");
        foreach (int i in new[] { 1, keeper.Saved.Count / 2, keeper.Saved.Count - 2 }.Distinct())
        {
            var checkpoint = SamplingCheckpoint.ReadFrom(new MemoryStream(keeper.Saved[i]));
            Assert.True(reference == w.Resume(settings with { MaxThreads = 1 }, checkpoint), $"{walk}: resumed from checkpoint {i} of {keeper.Saved.Count}");
        }
    }

    /// <summary>
    /// Stationarity: on a harmonic bond V = k(r − r0)²/2 (invented k = 2 eV/Å², r0 = 1.5 Å) the line walk must draw the
    /// Gaussian N(r0, kT/k) (closed form; the window is ±9 σ wide, so the walls remove less than 1e-18 of it), and the radial
    /// walk the density ∝ r² e^(−V/kT) (its CDF by MathNet Gauss–Legendre quadrature). Draws are thinned every 50 steps,
    /// far beyond their autocorrelation time, and the test's false-alarm rate is 1e-3.
    /// </summary>
    [Theory]
    [InlineData("pair-line")]
    [InlineData("pair-radial")]
    public void DrawsFollowTheKnownDistributionOfAHarmonicBond(string walk)
    {
        var bond = new HarmonicBond(2.0, Length.FromAngstroms(1.5));
        var t = Temperature.FromKelvin(300);
        double kT = t.ThermalEnergyInElectronVolts, sigma = Math.Sqrt(kT / 2.0);
        var lo = Length.FromAngstroms(1.5 - 9 * sigma);
        var hi = Length.FromAngstroms(1.5 + 9 * sigma);
        var landscape = walk == "pair-line" ? PairLandscape.Line(bond, lo, hi) : PairLandscape.Radial(bond, lo, hi);
        var settings = new SamplingSettings { Seed = 99, Chains = 4, SamplesPerChain = 50_000, BurnIn = 5000, RetainedDrawsPerChain = 50_000 };
        var report = PairSampler.Run(landscape, Mass12, t, settings);
        var draws = report.Draws.Thinned(50).SelectMany(c => c).ToList();
        Func<double, double> cdf;
        if (walk == "pair-line")
        {
            cdf = new Normal(1.5, sigma).CumulativeDistribution;
        }
        else
        {
            double Weight(double r) => r * r * Math.Exp(-(r - 1.5) * (r - 1.5) / sigma / sigma / 2);
            double total = MathNet.Numerics.Integration.GaussLegendreRule.Integrate(Weight, lo.InAngstroms, hi.InAngstroms, 128);
            cdf = x => MathNet.Numerics.Integration.GaussLegendreRule.Integrate(Weight, lo.InAngstroms, Math.Min(x, hi.InAngstroms), 128) / total;
        }
        StatisticalAssert.PassesKolmogorovSmirnov(draws, cdf);
    }

    /// <summary>
    /// Stationarity of the site walk. No 3D landscape of pair potentials has a closed-form density, so the reference is an
    /// independent exact sampler: direct draws by rejection from a Gaussian envelope (i.i.d. from the Boltzmann density,
    /// 400 000 of them). The walk's draws, thinned every 25 steps (beyond their autocorrelation time), must pass a
    /// Kolmogorov–Smirnov test against the empirical distribution of the direct draws along each axis and in the distance
    /// from the minimum. The empirical reference adds at most about 1/√400 000 ≈ 0.0016 to the distance the test tolerates
    /// (about 0.02 for these 8 000 draws at the 1e-3 false-alarm rate), so the rate stays near its nominal value.
    /// Invented cage as above, at 20 K.
    /// </summary>
    [Fact]
    public void SiteDrawsFollowTheDistributionOfAnIndependentExactSampler()
    {
        var t = Temperature.FromKelvin(20);
        var direct = SiteSampler.Run(Cage, Mass12, t, new SamplingSettings
        {
            Seed = 5, Method = SamplingMethod.Direct, Chains = 4, SamplesPerChain = 100_000, RetainedDrawsPerChain = 100_000,
        });
        var walk = SiteSampler.Run(Cage, Mass12, t, new SamplingSettings
        {
            Seed = 6, Chains = 4, SamplesPerChain = 50_000, BurnIn = 5000, RetainedDrawsPerChain = 50_000,
        });
        var reference = direct.Draws.Chains.SelectMany(c => c).ToList();
        var draws = walk.Draws.Thinned(25).SelectMany(c => c).ToList();
        var min = walk.Minimum;
        Func<Position, double>[] coordinates = [p => p.X, p => p.Y, p => p.Z, p => (p - min).Norm];
        foreach (var coordinate in coordinates)
        {
            var sorted = reference.Select(coordinate).Order().ToArray();
            double Cdf(double x)
            {
                int i = Array.BinarySearch(sorted, x);
                return (i >= 0 ? i + 1 : ~i) / (double)sorted.Length;
            }
            StatisticalAssert.PassesKolmogorovSmirnov(draws.Select(coordinate).ToList(), Cdf);
        }
    }
}
