using System;
using System.Collections.Generic;
using System.Collections.Immutable;
using System.Diagnostics;
using System.IO;
using System.Linq;
using System.Security.Cryptography;
using System.Text;
using System.Threading;
using FsCheck;
using FsCheck.Fluent;
using ThermalSampling.Persistence;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Reports;
using ThermalSampling.Sampling;
using ThermalSampling.Units;
using Xunit;

namespace ThermalSampling.Tests;

/// <summary>
/// Checkpoint and resume: a resumed sweep must give the same bits as the uninterrupted one (the reference here is the
/// library's own uninterrupted run: bit identity is the property under test, not a physical value); damaged, cut-short
/// and foreign checkpoints must be refused with a message that says why.
/// </summary>
public sealed class CheckpointTests
{
    private static readonly Mass Argon = Mass.FromAtomicMassUnits(39.948);
    private static readonly LennardJones Lj = LennardJones.FromMinimum(Length.FromAngstroms(3.8), Energy.FromKelvin(119.8)); // Sources.Argon (eps)
    private static readonly PairLandscape<LennardJones> Line = PairLandscape.Line(Lj, Length.FromAngstroms(3.2), Length.FromAngstroms(6.0));
    private static readonly ImmutableArray<Temperature> TwoTemperatures = [Temperature.FromKelvin(30), Temperature.FromKelvin(60)];

    private static SiteLandscape<LennardJones> Cage() => SiteLandscape.Create(Lj,
        LatticeSites.NeighbourCage(LatticeKind.FaceCentredCubic, Length.FromAngstroms(3.8), 1), Position.Origin, Confinement.Sphere(Length.FromAngstroms(1.2)));

    private static SamplingSettings Settings(SamplingMethod method = SamplingMethod.Metropolis, int chains = 5, long samples = 30_000, long burnIn = 9000,
        int? lanes = null, int retained = 100) => new()
    {
        Seed = 77, Method = method, Chains = chains, SamplesPerChain = samples, BurnIn = burnIn, ChainsPerVector = lanes,
        MaxDiagnosticValuesPerChain = 1000, RetainedDrawsPerChain = retained,
    };

    /// <summary>Every number a pair report carries, in a fixed order, as bits.</summary>
    internal static string Bits(PairVibrationReport r)
    {
        var v = new List<double> { r.Mean.Value, r.Mean.StandardError, r.Variance.Value, r.Variance.StandardError, r.Rms.Value, r.Skewness, r.ExcessKurtosis,
            r.Diagnostics.AcceptanceRate ?? -1, r.Diagnostics.AutocorrelationTime, r.Diagnostics.EffectiveSampleSize, r.Diagnostics.RHat ?? -1,
            r.Diagnostics.Draws, r.Diagnostics.BlockingStandardError, r.Diagnostics.FinalStepWidthInAngstroms ?? -1, r.Histogram.Count, r.Exact.ZScoreMean };
        v.AddRange(r.Histogram.Density);
        v.AddRange(r.Histogram.DensityStandardError);
        v.AddRange([r.ThirdCumulant.Value, r.ThirdCumulant.StandardError, r.FourthCumulant.Value, r.FourthCumulant.StandardError]);
        v.AddRange(FactorBits(r.TemperatureFactors));
        v.AddRange(r.Draws.Chains.SelectMany(c => c));
        return string.Join(",", v.Select(x => BitConverter.DoubleToUInt64Bits(x).ToString("x16"))) + "|" + string.Join(";", r.Warnings.Select(w => w.Code + w.Message));
    }

    /// <summary>Every number a site report carries, in a fixed order, as bits.</summary>
    internal static string Bits(SiteVibrationReport r)
    {
        var c = r.Covariance;
        var v = new List<double> { r.Mean.X, r.Mean.Y, r.Mean.Z, r.MeanStandardError.X, r.MeanStandardError.Y, r.MeanStandardError.Z, c.XX, c.YY, c.ZZ, c.XY, c.XZ, c.YZ,
            r.MeanSquareDisplacement.Value, r.MeanSquareDisplacement.StandardError, r.Diagnostics.AcceptanceRate ?? -1, r.Diagnostics.AutocorrelationTime,
            r.Diagnostics.EffectiveSampleSize, r.Diagnostics.RHat ?? -1, r.Diagnostics.Draws, r.Diagnostics.FinalStepWidthInAngstroms ?? -1, r.RadialHistogram.Count };
        v.AddRange(r.RadialHistogram.Density);
        v.AddRange(r.ThirdCumulants.Concat(r.FourthCumulants).SelectMany(k => new[] { k.Value, k.StandardError }));
        var d = r.Distribution;
        v.AddRange(d.Marginals.SelectMany(m => m.Density.Concat(m.DensityStandardError)));
        v.AddRange(d.Radial.Density);
        v.AddRange(d.Projection.Density);
        v.AddRange(d.ShareOutsideMarginals);
        v.AddRange([d.ShareBeyondRadial, d.ShareOutsideProjection]);
        v.AddRange(FactorBits(r.TemperatureFactors));
        v.AddRange(r.Draws.Chains.SelectMany(ch => ch.SelectMany(p => new[] { p.X, p.Y, p.Z })));
        return string.Join(",", v.Select(x => BitConverter.DoubleToUInt64Bits(x).ToString("x16"))) + "|" + string.Join(";", r.Warnings.Select(w => w.Code + w.Message));
    }

    private static IEnumerable<double> FactorBits(IEnumerable<TemperatureFactorPoint> points)
        => points.SelectMany(p => new[] { p.Real.Value, p.Real.StandardError, p.Imaginary.Value, p.Imaginary.StandardError, p.Gaussian,
            p.DepartureFromGaussian.Value, p.DepartureFromGaussian.StandardError });

    private static string Bits(IEnumerable<PairVibrationReport> reports) => string.Join("\n", reports.Select(Bits));

    private static string Bits(IEnumerable<SiteVibrationReport> reports) => string.Join("\n", reports.Select(Bits));

    /// <summary>Keeps every checkpoint of a run, as the bytes a file would hold.</summary>
    internal sealed class Keeper
    {
        private readonly List<byte[]> _saved = new();

        internal CheckpointOptions Options(TimeSpan interval, string? applicationData = null) => new(interval, c =>
        {
            var m = new MemoryStream();
            c.WriteTo(m);
            lock (_saved)
            {
                _saved.Add(m.ToArray());
            }
        })
        { ApplicationData = applicationData };

        internal IReadOnlyList<byte[]> Saved => _saved;
    }

    private static SamplingCheckpoint Read(byte[] bytes) => SamplingCheckpoint.ReadFrom(new MemoryStream(bytes));

    [Theory]
    [InlineData(SamplingMethod.Metropolis, 1)]
    [InlineData(SamplingMethod.Metropolis, 4)]
    [InlineData(SamplingMethod.Metropolis, 8)]
    [InlineData(SamplingMethod.Direct, null)]
    public void PairSweepResumedFromAnyCheckpointGivesTheUninterruptedBits(SamplingMethod method, int? lanes)
    {
        var settings = Settings(method, lanes: lanes);
        string reference = Bits(PairSampler.Sweep(Line, Argon, TwoTemperatures, settings));
        var keeper = new Keeper();
        string checkpointed = Bits(PairSampler.SweepWithCheckpoints(Line, Argon, TwoTemperatures, settings with { MaxThreads = 2 }, keeper.Options(TimeSpan.Zero)));
        Assert.Equal(reference, checkpointed);
        // How many checkpoints a zero interval yields depends on how the two threads meet the chunk boundaries (writes that
        // overlap are coalesced); five or more leave the picks below distinct.
        Assert.True(keeper.Saved.Count >= 5, $"only {keeper.Saved.Count} checkpoints");
        var picks = new[] { 0, 1, keeper.Saved.Count / 3, keeper.Saved.Count / 2, keeper.Saved.Count - 1 }.Distinct();
        foreach (int i in picks)
        {
            var checkpoint = Read(keeper.Saved[i]);
            Assert.Equal(reference, Bits(PairSampler.Resume(Line, Argon, TwoTemperatures, settings with { MaxThreads = 1 }, checkpoint)));
        }
    }

    [Theory]
    [InlineData(SamplingMethod.Metropolis, 2)]
    [InlineData(SamplingMethod.Metropolis, null)]
    [InlineData(SamplingMethod.Direct, null)]
    public void SiteSweepResumedFromAnyCheckpointGivesTheUninterruptedBits(SamplingMethod method, int? lanes)
    {
        var cage = Cage();
        var settings = Settings(method, chains: 3, samples: 12_000, burnIn: 5000, lanes: lanes, retained: 50);
        string reference = Bits(SiteSampler.Sweep(cage, Argon, TwoTemperatures, settings));
        var keeper = new Keeper();
        Assert.Equal(reference, Bits(SiteSampler.SweepWithCheckpoints(cage, Argon, TwoTemperatures, settings, keeper.Options(TimeSpan.Zero))));
        foreach (int i in new[] { 0, keeper.Saved.Count / 2, keeper.Saved.Count - 1 }.Distinct())
        {
            Assert.Equal(reference, Bits(SiteSampler.Resume(cage, Argon, TwoTemperatures, settings, Read(keeper.Saved[i]))));
        }
    }

    /// <summary>Property: wherever a run is cancelled (after any number of chunk boundaries), resuming its last checkpoint gives the uninterrupted bits.</summary>
    [Fact]
    public void ResumedRunEqualsUninterruptedRunWhereverItIsCancelled()
    {
        var gen = from seed in Gen.Choose(0, 1_000_000)
                  from chains in Gen.Choose(1, 6)
                  from samples in Gen.Choose(20, 20_000)
                  from burnIn in Gen.Choose(0, 12_000)
                  from lanes in Gen.Elements(1, 2, 4, 8)
                  from cutAfter in Gen.Choose(0, 40)
                  from direct in Gen.Elements(false, false, true)
                  select (seed, chains, samples, burnIn, lanes, cutAfter, direct);
        Prop.ForAll(gen.ToArbitrary(), c =>
        {
            var settings = new SamplingSettings
            {
                Seed = (ulong)c.seed, Chains = c.chains, SamplesPerChain = c.samples, BurnIn = c.burnIn, ChainsPerVector = c.lanes, RetainedDrawsPerChain = 30,
                Method = c.direct ? SamplingMethod.Direct : SamplingMethod.Metropolis, MaxDiagnosticValuesPerChain = 256, MaxThreads = 2,
            };
            string reference = Bits(PairSampler.Sweep(Line, Argon, TwoTemperatures, settings));
            byte[]? last = null;
            using var cts = new CancellationTokenSource();
            int boundaries = 0;
            var progress = new SynchronousProgress(_ =>
            {
                if (Interlocked.Increment(ref boundaries) > c.cutAfter)
                {
                    cts.Cancel();
                }
            });
            var options = new CheckpointOptions(TimeSpan.FromHours(1), cp =>
            {
                var m = new MemoryStream();
                cp.WriteTo(m);
                last = m.ToArray();
            });
            string resumed;
            try
            {
                resumed = Bits(PairSampler.SweepWithCheckpoints(Line, Argon, TwoTemperatures, settings, options, progress, cts.Token));
            }
            catch (OperationCanceledException)
            {
                Assert.NotNull(last);
                resumed = Bits(PairSampler.Resume(Line, Argon, TwoTemperatures, settings, Read(last!)));
            }
            return resumed == reference;
        }).QuickCheckThrowOnFailure();
    }

    /// <summary>Progress reported on the reporting thread (Progress&lt;T&gt; would post to the thread pool, after the run).</summary>
    private sealed class SynchronousProgress(Action<SamplingProgress> report) : IProgress<SamplingProgress>
    {
        public void Report(SamplingProgress value) => report(value);
    }

    [Fact]
    public void CancellationStopsWithin100MillisecondsAndLeavesAUsableCheckpoint()
    {
        // A 200-neighbour cage (fcc, several shells) is the slowest chunk the library runs: 4096 steps × the lanes of a group.
        var sites = LatticeSites.NeighbourCage(LatticeKind.FaceCentredCubic, Length.FromAngstroms(3.8), 5);
        var cage = SiteLandscape.Create(Lj, sites, Position.Origin, Confinement.Sphere(Length.FromAngstroms(1.2)));
        var settings = Settings(chains: 4, samples: 50_000_000, burnIn: 1000, retained: 0) with { MaxThreads = 2 };
        var best = TimeSpan.MaxValue;
        for (int attempt = 0; attempt < 3 && best > TimeSpan.FromMilliseconds(100); attempt++)
        {
            byte[]? last = null;
            using var cts = new CancellationTokenSource();
            var options = new CheckpointOptions(TimeSpan.FromHours(1), cp =>
            {
                var m = new MemoryStream();
                cp.WriteTo(m);
                last = m.ToArray();
            });
            var stopwatch = new Stopwatch();
            var started = new ManualResetEventSlim();
            var progress = new SynchronousProgress(p =>
            {
                if (p.ChainStepsDone > 100_000)
                {
                    started.Set();
                }
            });
            var run = System.Threading.Tasks.Task.Run(() => SiteSampler.SweepWithCheckpoints(cage, Argon, [Temperature.FromKelvin(40)], settings, options, progress, cts.Token));
            Assert.True(started.Wait(TimeSpan.FromSeconds(60)), "the run did not start");
            stopwatch.Start();
            cts.Cancel();
            var ex = Assert.ThrowsAny<OperationCanceledException>(() => run.GetAwaiter().GetResult());
            stopwatch.Stop();
            best = stopwatch.Elapsed < best ? stopwatch.Elapsed : best;
            var checkpoint = Read(last!);
            Assert.InRange(checkpoint.ChainStepsDone, 100_000, checkpoint.ChainStepsTotal - 1);
            Assert.Equal(0, checkpoint.FinishedTemperatures);
        }
        Assert.True(best <= TimeSpan.FromMilliseconds(100), $"cancellation took {best.TotalMilliseconds:F1} ms (best of 3), checkpoint included");
    }

    private static byte[] OneCheckpoint(out SamplingSettings settings)
    {
        settings = Settings(samples: 5000, burnIn: 0, chains: 2);
        var keeper = new Keeper();
        PairSampler.SweepWithCheckpoints(Line, Argon, TwoTemperatures, settings, keeper.Options(TimeSpan.FromHours(1)));
        return keeper.Saved[0];
    }

    [Fact]
    public void ACheckpointIsOneLineOfJsonMetadataThenTheBodyAndItsChecksum()
    {
        var bytes = OneCheckpoint(out var settings);
        int newline = Array.IndexOf(bytes, (byte)'\n');
        using var meta = System.Text.Json.JsonDocument.Parse(bytes.AsMemory(0, newline));
        var root = meta.RootElement;
        Assert.Equal(SamplingCheckpoint.FormatName, root.GetProperty("format").GetString());
        Assert.Equal(SamplingCheckpoint.FormatVersion, root.GetProperty("formatVersion").GetInt32());
        Assert.Equal(Provenance.CurrentLibraryVersion, root.GetProperty("libraryVersion").GetString());
        Assert.Equal(new[] { 30.0, 60.0 }, root.GetProperty("temperaturesInKelvin").EnumerateArray().Select(e => e.GetDouble()));
        Assert.Equal(77UL, root.GetProperty("settings").GetProperty("seed").GetUInt64());
        long body = root.GetProperty("bodyBytes").GetInt64();
        Assert.Equal(newline + 1 + body + 32, bytes.Length);
        // The last 32 bytes are SHA-256 of everything before them (FIPS 180-4, through .NET's implementation).
        Assert.Equal(SHA256.HashData(bytes.AsSpan(0, bytes.Length - 32)), bytes[^32..]);
        var checkpoint = Read(bytes);
        Assert.Equal(settings with { MaxThreads = null }, checkpoint.Settings with { MaxThreads = null });
        Assert.Equal(TwoTemperatures.ToArray(), checkpoint.Temperatures.ToArray());
        Assert.Equal(Argon, checkpoint.Mass);
        Assert.Equal("pair", checkpoint.LandscapeKind);
    }

    [Fact]
    public void DamagedOrCutShortCheckpointsAreRefusedAndNothingIsLoaded()
    {
        var bytes = OneCheckpoint(out _);
        int newline = Array.IndexOf(bytes, (byte)'\n');
        var flipped = (byte[])bytes.Clone();
        flipped[newline + 40] ^= 0x10;
        Assert.Contains("checksum", Assert.Throws<CheckpointException>(() => Read(flipped)).Message);
        foreach (int cut in new[] { 0, 5, newline, newline + 1, newline + 100, bytes.Length - 33, bytes.Length - 1 })
        {
            var ex = Assert.Throws<CheckpointException>(() => Read(bytes[..cut]));
            Assert.True(ex.Message.Contains("cut short") || ex.Message.Contains("empty"), $"cut at {cut}: {ex.Message}");
        }
        // The same through a stream that cannot seek (no length known in advance).
        Assert.Contains("cut short", Assert.Throws<CheckpointException>(() => SamplingCheckpoint.ReadFrom(new ForwardOnlyStream(bytes[..(newline + 200)]))).Message);
        Assert.Contains("after its checksum", Assert.Throws<CheckpointException>(() => Read([.. bytes, 0])).Message);
        Assert.Contains("not a checkpoint", Assert.Throws<CheckpointException>(() => Read(Encoding.UTF8.GetBytes("{\"title\": \"a scenario\"}\n"))).Message);
        Assert.Contains("not valid JSON", Assert.Throws<CheckpointException>(() => Read(Encoding.UTF8.GetBytes("PK\u0003\u0004 zip\n"))).Message);
    }

    /// <summary>Rewrites one metadata value and re-signs the file, as a checkpoint from elsewhere would be.</summary>
    private static byte[] WithMetadata(byte[] bytes, string from, string to)
    {
        int newline = Array.IndexOf(bytes, (byte)'\n');
        string meta = Encoding.UTF8.GetString(bytes, 0, newline);
        Assert.Contains(from, meta);
        var head = Encoding.UTF8.GetBytes(meta.Replace(from, to) + "\n");
        var content = head.Concat(bytes[(newline + 1)..^32]).ToArray();
        return [.. content, .. SHA256.HashData(content)];
    }

    [Fact]
    public void ACheckpointFromAnotherVersionOrRunIsRefusedNamingTheDifference()
    {
        var bytes = OneCheckpoint(out var settings);
        var other = Read(WithMetadata(bytes, "\"libraryVersion\":\"" + Provenance.CurrentLibraryVersion, "\"libraryVersion\":\"0.0.1"));
        var ex = Assert.Throws<CheckpointException>(() => PairSampler.Resume(Line, Argon, TwoTemperatures, settings, other));
        Assert.Contains("library version 0.0.1", ex.Message);
        Assert.Contains("format version 6; this library reads version 7", Assert.Throws<CheckpointException>(() => Read(WithMetadata(bytes, "\"formatVersion\":7", "\"formatVersion\":6"))).Message); // a checkpoint of the layout before the temperature-ladder section

        var checkpoint = Read(bytes);
        Assert.Contains("temperatures are [30, 60] K, and this run's are [30, 61] K",
            Assert.Throws<CheckpointException>(() => PairSampler.Resume(Line, Argon, [Temperature.FromKelvin(30), Temperature.FromKelvin(61)], settings, checkpoint)).Message);
        Assert.Contains("its Seed is 77, and this run's is 78",
            Assert.Throws<CheckpointException>(() => PairSampler.Resume(Line, Argon, TwoTemperatures, settings with { Seed = 78 }, checkpoint)).Message);
        Assert.Contains("SamplesPerChain is 5000, and this run's is 6000",
            Assert.Throws<CheckpointException>(() => PairSampler.Resume(Line, Argon, TwoTemperatures, settings with { SamplesPerChain = 6000 }, checkpoint)).Message);
        Assert.Contains("mass is 39.948 u",
            Assert.Throws<CheckpointException>(() => PairSampler.Resume(Line, Mass.FromAtomicMassUnits(40), TwoTemperatures, settings, checkpoint)).Message);
        var wider = PairLandscape.Line(Lj, Length.FromAngstroms(3.2), Length.FromAngstroms(6.1));
        Assert.Contains("landscape", Assert.Throws<CheckpointException>(() => PairSampler.Resume(wider, Argon, TwoTemperatures, settings, checkpoint)).Message);
        var deeper = PairLandscape.Line(LennardJones.FromMinimum(Length.FromAngstroms(3.8), Energy.FromKelvin(119.9)), Length.FromAngstroms(3.2), Length.FromAngstroms(6.0));
        Assert.Contains("potential", Assert.Throws<CheckpointException>(() => PairSampler.Resume(deeper, Argon, TwoTemperatures, settings, checkpoint)).Message);
        Assert.Contains("sites landscape", Assert.Throws<CheckpointException>(() => SiteSampler.Resume(Cage(), Argon, TwoTemperatures, settings, checkpoint)).Message);
        // Threads and vector width change nothing and are not compared.
        Assert.Equal(2, PairSampler.Resume(Line, Argon, TwoTemperatures, settings with { MaxThreads = 1, ChainsPerVector = 1 }, checkpoint).Length);
    }

    [Fact]
    public void FileWritesAreAtomicAndAFailedWriteKeepsThePreviousCheckpoint()
    {
        string folder = Path.Combine(Path.GetTempPath(), "ts-checkpoint-" + Guid.NewGuid().ToString("N"));
        Directory.CreateDirectory(folder);
        try
        {
            string path = Path.Combine(folder, "run.checkpoint");
            var bytes = OneCheckpoint(out var settings);
            var first = Read(bytes);
            first.WriteToFile(path);
            Assert.Equal(bytes.Length, new FileInfo(path).Length);
            // A crash mid-write leaves only the temporary file damaged: the checkpoint itself still reads.
            File.WriteAllBytes(path + ".writing", bytes[..100]);
            Assert.Equal(first.ChainStepsDone, SamplingCheckpoint.ReadFromFile(path).ChainStepsDone);
            first.WriteToFile(path);
            Assert.False(File.Exists(path + ".writing"));

            // A save that fails stops the run with its own exception.
            var failing = new CheckpointOptions(TimeSpan.Zero, _ => throw new IOException("disk full (simulated)"));
            Assert.Contains("disk full", Assert.Throws<IOException>(() => PairSampler.SweepWithCheckpoints(Line, Argon, TwoTemperatures, settings, failing)).Message);

            var toFile = CheckpointOptions.ToFile(path, TimeSpan.Zero);
            var reports = PairSampler.SweepWithCheckpoints(Line, Argon, TwoTemperatures, settings, toFile);
            var last = SamplingCheckpoint.ReadFromFile(path);
            Assert.Equal(Bits(reports), Bits(PairSampler.Resume(Line, Argon, TwoTemperatures, settings, last)));
            Assert.Contains("does not exist", Assert.Throws<CheckpointException>(() => SamplingCheckpoint.ReadFromFile(Path.Combine(folder, "none"))).Message);
            Assert.Contains("does not exist", Assert.Throws<ArgumentException>(() => CheckpointOptions.ToFile(Path.Combine(folder, "no", "x"), TimeSpan.Zero)).Message);
            Assert.Throws<ArgumentOutOfRangeException>(() => new CheckpointOptions(TimeSpan.FromSeconds(-1), _ => { }));
        }
        finally
        {
            Directory.Delete(folder, recursive: true);
        }
    }

    /// <summary>A stream that cannot seek, and hands out at most <paramref name="most"/> bytes per read (as a pipe may).</summary>
    internal sealed class ForwardOnlyStream(byte[] data, int most = int.MaxValue) : Stream
    {
        private readonly MemoryStream _inner = new(data);

        public override bool CanRead => true;

        public override bool CanSeek => false;

        public override bool CanWrite => false;

        public override long Length => throw new NotSupportedException();

        public override long Position { get => throw new NotSupportedException(); set => throw new NotSupportedException(); }

        public override void Flush()
        {
        }

        public override int Read(byte[] buffer, int offset, int count) => _inner.Read(buffer, offset, Math.Min(count, most));

        public override long Seek(long offset, SeekOrigin origin) => throw new NotSupportedException();

        public override void SetLength(long value) => throw new NotSupportedException();

        public override void Write(byte[] buffer, int offset, int count) => throw new NotSupportedException();
    }
}
