using System;
using System.Buffers.Binary;
using System.Collections.Generic;
using System.IO;
using System.Linq;
using System.Security.Cryptography;
using System.Text;
using ThermalSampling.Persistence;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Sampling;
using ThermalSampling.Units;
using Xunit;

namespace ThermalSampling.Tests;

/// <summary>
/// The checkpoint file's layout (docs/checkpoints.md) read back field by field, and every refusal of a file that passes
/// its checksum but does not hold a valid checkpoint: such a file is what a writer of another program, or a hand edit,
/// produces. Also the state sections inside the body, the checkpoint options and the run-identity comparison. Written
/// against what the checkpoints mutation mode can change (docs/validation.md).
/// </summary>
public class CheckpointFormatTests
{
    private static readonly Mass Argon = Mass.FromAtomicMassUnits(39.948);
    private static readonly LennardJones Lj = LennardJones.FromMinimum(Length.FromAngstroms(3.8), Energy.FromKelvin(119.8)); // Sources.Argon (eps)
    private static readonly PairLandscape<LennardJones> Line = PairLandscape.Line(Lj, Length.FromAngstroms(3.2), Length.FromAngstroms(6.0));
    private static readonly Temperature[] TwoTemperatures = [Temperature.FromKelvin(30), Temperature.FromKelvin(60)];

    private static SamplingSettings Direct(long samples = 3 * 4096) => new()
    {
        Seed = 5, Method = SamplingMethod.Direct, Chains = 2, SamplesPerChain = samples, BurnIn = 0, MaxThreads = 1,
    };

    /// <summary>Every checkpoint of a short two-temperature sweep (a checkpoint at every chunk boundary), as bytes.</summary>
    private static List<byte[]> Sweep(SamplingSettings settings, string? applicationData = null)
    {
        var keeper = new CheckpointTests.Keeper();
        PairSampler.SweepWithCheckpoints(Line, Argon, TwoTemperatures, settings, keeper.Options(TimeSpan.Zero, applicationData));
        return keeper.Saved.ToList();
    }

    private static SamplingCheckpoint Read(byte[] bytes) => SamplingCheckpoint.ReadFrom(new MemoryStream(bytes));

    internal static (string Metadata, byte[] Body) Split(byte[] file)
    {
        int newline = Array.IndexOf(file, (byte)'\n');
        return (Encoding.UTF8.GetString(file, 0, newline), file[(newline + 1)..^32]);
    }

    /// <summary>A file with this metadata and body, its bodyBytes and checksum made right, as another writer would make it.</summary>
    internal static byte[] Forge(string metadata, byte[] body, bool fixBodyBytes = true)
    {
        if (fixBodyBytes)
        {
            int at = metadata.IndexOf("\"bodyBytes\":", StringComparison.Ordinal);
            Assert.True(at > 0);
            metadata = metadata[..at] + "\"bodyBytes\":" + body.Length.ToString(System.Globalization.CultureInfo.InvariantCulture) + "}";
        }
        var content = Encoding.UTF8.GetBytes(metadata + "\n").Concat(body).ToArray();
        return [.. content, .. SHA256.HashData(content)];
    }

    private static string Refusal(byte[] file) => Assert.Throws<CheckpointException>(() => Read(file)).Message;

    private static string Replace(string text, string from, string to)
    {
        Assert.Contains(from, text);
        return text.Replace(from, to, StringComparison.Ordinal);
    }

    /// <summary>The body's layout, per temperature: a status byte (0 not started, 1 running, 2 finished), then for a started
    /// temperature its group count and per group the steps done, the state's length (−1 for none) and the state.</summary>
    private sealed record Group(long Steps, byte[]? State);

    /// <summary>The body's temperatures (two in these tests), then its temperature-ladder section, which must be absent (length −1) and last.</summary>
    private static List<(byte Status, List<Group> Groups)> ParseBody(byte[] body, int temperatures = 2)
    {
        var result = new List<(byte, List<Group>)>();
        int at = 0;
        long Next()
        {
            long v = BinaryPrimitives.ReadInt64LittleEndian(body.AsSpan(at));
            at += 8;
            return v;
        }
        for (int t = 0; t < temperatures; t++)
        {
            byte status = body[at++];
            var groups = new List<Group>();
            if (status != 0)
            {
                long count = Next();
                for (int g = 0; g < count; g++)
                {
                    long steps = Next(), length = Next();
                    groups.Add(new Group(steps, length < 0 ? null : body[at..(at + (int)length)]));
                    at += (int)Math.Max(length, 0);
                }
            }
            result.Add((status, groups));
        }
        Assert.Equal(-1, Next()); // no ladder
        Assert.Equal(body.Length, at);
        return result;
    }

    internal static byte[] Long(long v)
    {
        var b = new byte[8];
        BinaryPrimitives.WriteInt64LittleEndian(b, v);
        return b;
    }

    [Fact]
    public void The_metadata_summarises_the_body_and_the_body_has_the_documented_layout()
    {
        var settings = Direct();
        var files = Sweep(settings, "invented scenario text, \"quoted\" and on\ntwo lines");
        Assert.True(files.Count >= 4, $"{files.Count} checkpoints");
        long total = 2 * 3 * 4096 * 2L;
        bool sawFinished = false;
        foreach (var file in files)
        {
            var (metadata, body) = Split(file);
            using var json = System.Text.Json.JsonDocument.Parse(metadata);
            var root = json.RootElement;
            var checkpoint = Read(file);
            var layout = ParseBody(body);
            Assert.Equal(2, layout.Count);
            long done = layout.Sum(t => t.Groups.Sum(g => g.Steps));
            int finished = layout.Count(t => t.Status == 2);
            sawFinished |= finished > 0;
            Assert.Equal(done, checkpoint.ChainStepsDone);
            Assert.Equal(done, root.GetProperty("chainStepsDone").GetInt64());
            Assert.Equal(finished, checkpoint.FinishedTemperatures);
            Assert.Equal(finished, root.GetProperty("temperaturesFinished").GetInt32());
            Assert.Equal(total, checkpoint.ChainStepsTotal);
            Assert.Equal(total, root.GetProperty("chainStepsTotal").GetInt64());
            Assert.Equal(body.Length, root.GetProperty("bodyBytes").GetInt64());
            Assert.Equal(1, root.GetProperty("chainsPerVector").GetInt32());
            Assert.Equal("pair", root.GetProperty("landscapeKind").GetString());
            Assert.Equal(Line.Description, root.GetProperty("landscape").GetString());
            Assert.Equal(Line.Description, checkpoint.Landscape);
            Assert.Equal(64, root.GetProperty("landscapeFingerprint").GetString()!.Length);
            Assert.Equal(39.948, root.GetProperty("massInAtomicMassUnits").GetDouble());
            Assert.Equal("invented scenario text, \"quoted\" and on\ntwo lines", checkpoint.ApplicationData);
            Assert.True(DateTimeOffset.TryParse(root.GetProperty("writtenUtc").GetString(), out _));
            foreach (var (status, groups) in layout)
            {
                Assert.InRange(status, (byte)0, (byte)2);
                if (status != 0)
                {
                    Assert.Equal(2, groups.Count); // one direct chain per group
                    Assert.All(groups, g => Assert.InRange(g.Steps, 0, 3 * 4096));
                }
                if (status == 2)
                {
                    Assert.All(groups, g => Assert.Equal(3 * 4096, g.Steps));
                }
            }
            Assert.NotEqual(0, layout[0].Status); // the first checkpoint comes once the first temperature's chains are running
        }
        Assert.True(sawFinished, "some checkpoint was written after the first temperature finished");
        // No application data: null in the file and in the checkpoint.
        var plain = Sweep(Direct())[0];
        Assert.Contains("\"applicationData\":null", Split(plain).Metadata);
        Assert.Null(Read(plain).ApplicationData);
    }

    [Fact]
    public void Metropolis_burn_in_is_counted_in_the_total_steps()
    {
        var settings = new SamplingSettings { Seed = 5, Chains = 2, SamplesPerChain = 4096, BurnIn = 4096, MaxThreads = 1, ChainsPerVector = 1 };
        var first = Read(Sweep(settings)[0]);
        Assert.Equal(2 * 2 * (4096L + 4096), first.ChainStepsTotal);
        // Direct draws have no burn-in: a BurnIn setting is kept (and compared on resume) but adds no steps.
        var direct = Read(Sweep(Direct() with { BurnIn = 100 })[0]);
        Assert.Equal(2 * 2 * 3 * 4096L, direct.ChainStepsTotal);
        Assert.Equal(100, direct.Settings.BurnIn);
    }

    [Fact]
    public void A_forged_file_with_the_original_content_is_read_like_the_original()
    {
        var file = Sweep(Direct())[1];
        var (metadata, body) = Split(file);
        Assert.Equal(file, Forge(metadata, body));
        Assert.Equal(Read(file).ChainStepsDone, Read(Forge(metadata, body)).ChainStepsDone);
    }

    public static TheoryData<string, string, string> MetadataForgeries => new()
    {
        { "\"chainsPerVector\":1", "\"chainsPerVector\":3", "chainsPerVector = 3; valid: 1, 2, 4 or 8." },
        { "\"chainsPerVector\":1", "\"chainsPerVector\":16", "chainsPerVector = 16; valid: 1, 2, 4 or 8." },
        { "\"landscapeKind\":\"pair\"", "\"landscapeKind\":7", "lacks \"landscapeKind\" (or it has the wrong type)" },
        { "\"landscapeKind\":\"pair\"", "\"landKind\":\"pair\"", "lacks \"landscapeKind\"" },
        { "\"massInAtomicMassUnits\":39.948", "\"massInAtomicMassUnits\":\"39.948\"", "lacks \"massInAtomicMassUnits\"" },
        { "\"temperaturesInKelvin\":[30,60]", "\"temperaturesInKelvin\":{}", "lacks \"temperaturesInKelvin\"" },
        { "\"libraryVersion\":", "\"libraryVersionX\":", "lacks \"libraryVersion\"" },
        { "\"formatVersion\":" + SamplingCheckpoint.FormatVersion, "\"formatVersion\":\"" + SamplingCheckpoint.FormatVersion + "\"", "lacks \"formatVersion\"" },
        { "\"format\":\"thermal-sampling-checkpoint\"", "\"format\":\"something-else\"", "This is not a checkpoint" },
        { "\"format\":\"thermal-sampling-checkpoint\"", "\"format\":1", "This is not a checkpoint" },
        { "\"seed\":5", "\"seedling\":5", "settings lack \"seed\"" },
        { "\"method\":\"Direct\"", "\"method\":\"Sideways\"", "settings name an unknown method" },
        { "\"method\":\"Direct\"", "\"method\":\"direct\"", "settings name an unknown method" },
        { "\"chains\":2", "\"chains\":0", "settings are invalid: Invalid sampling settings: Chains = 0 is out of range" },
        { "\"seed\":5", "\"seed\":-5", "metadata has a value of the wrong kind" },
        { "\"applicationData\":null", "\"applicationData\":5", "The checkpoint's \"applicationData\" is a Number; valid: a string or null." },
        { "\"applicationData\":null", "\"applicationData\":[\"a\"]", "The checkpoint's \"applicationData\" is a Array; valid: a string or null." },
    };

    [Theory]
    [MemberData(nameof(MetadataForgeries))]
    public void A_signed_file_with_bad_metadata_is_refused_naming_the_field(string from, string to, string message)
    {
        var (metadata, body) = Split(Sweep(Direct())[0]);
        Assert.Contains(message, Refusal(Forge(Replace(metadata, from, to), body)));
    }

    [Fact]
    public void A_signed_file_whose_announced_body_is_negative_or_absurd_is_refused_before_reading_it()
    {
        var (metadata, body) = Split(Sweep(Direct())[0]);
        string Announcing(long bytes) => Replace(metadata, "\"bodyBytes\":" + body.Length, "\"bodyBytes\":" + bytes);
        Assert.Contains("announces a body of -1 bytes; valid: 0 to ", Refusal(Forge(Announcing(-1), body, fixBodyBytes: false)));
        Assert.Contains("announces a body of 9000000000 bytes", Refusal(Forge(Announcing(9_000_000_000), body, fixBodyBytes: false)));
        // A body shorter than announced: cut short, found from the stream's length before reading.
        Assert.Contains("cut short: ", Refusal(Forge(Announcing(body.Length + 100), body, fixBodyBytes: false)));
    }

    public static TheoryData<string> BodyForgeries => new()
    {
        "status 3", "no groups", "more groups than chains", "length below -1", "length past the end", "finished without state",
        "extra byte", "missing temperature", "cut inside a number",
    };

    [Theory]
    [MemberData(nameof(BodyForgeries))]
    public void A_signed_file_with_a_bad_body_is_refused_with_what_is_wrong(string forgery)
    {
        // The last checkpoint: the first temperature finished (status 2), the second running (status 1).
        var files = Sweep(Direct());
        var (metadata, body) = Split(files.Last(f => ParseBody(Split(f).Body).Any(t => t.Status == 2) && ParseBody(Split(f).Body).Any(t => t.Status == 1)));
        var layout = ParseBody(body);
        Assert.Equal(2, layout[0].Status);
        int firstLength = layout[0].Groups[0].State!.Length;
        // Offsets: status byte, group count, then group 0's steps and length.
        const int groupCountAt = 1, lengthAt = 1 + 8 + 8;
        byte[] Patched(int at, byte[] bytes)
        {
            var copy = (byte[])body.Clone();
            bytes.CopyTo(copy, at);
            return copy;
        }
        var (bad, expected) = forgery switch
        {
            "status 3" => (Patched(0, [3]), "temperature 1 has status 3; valid: 0, 1 or 2."),
            "no groups" => (Patched(groupCountAt, Long(0)), "temperature 1 has 0 chain groups; valid: 1 to 2."),
            "more groups than chains" => (Patched(groupCountAt, Long(3)), "temperature 1 has 3 chain groups; valid: 1 to 2."),
            "length below -1" => (Patched(lengthAt, Long(-2)), "state of group 0 at temperature 1 has length -2, which does not fit the body."),
            "length past the end" => (Patched(lengthAt, Long(body.Length)), $"state of group 0 at temperature 1 has length {body.Length}, which does not fit the body."),
            "finished without state" => (Patched(lengthAt, Long(-1)), "has length -1, which does not fit the body."),
            "extra byte" => ([.. body, 0], "body has bytes after its temperature-ladder state."),
            "missing temperature" => (body[..(1 + 8 + 2 * 16 + firstLength + layout[0].Groups[1].State!.Length)], "body ends before its last temperature."),
            _ => (body[..(1 + 4)], "body ends early (its metadata and body disagree)."),
        };
        Assert.Contains(expected, Refusal(Forge(metadata, bad)));
    }

    [Fact]
    public void State_sections_round_trip_and_are_checked_by_tag_count_and_length()
    {
        var w = new StateWriter();
        w.Words("WORD", [1UL, ulong.MaxValue]);
        w.Doubles("DBLS", [0.1, -0.0, double.NaN]);
        w.Longs("LONG", [-7, long.MaxValue]);
        var bytes = w.ToArray();
        Assert.Equal(3 * 12 + 7 * 8, bytes.Length); // a 4-byte tag and an 8-byte count per section, 8 bytes per value
        var r = new StateReader(bytes, "a test group");
        Assert.Equal(new[] { 1UL, ulong.MaxValue }, r.Words("WORD", 2));
        var d = r.Doubles("DBLS", -1, 3);
        Assert.Equal(BitConverter.DoubleToUInt64Bits(-0.0), BitConverter.DoubleToUInt64Bits(d[1]));
        Assert.True(double.IsNaN(d[2]));
        Assert.Equal(new[] { -7L, long.MaxValue }, r.Longs("LONG", 2));
        r.End();

        string Problem(Action<StateReader> read, byte[]? data = null)
        {
            var ex = Assert.Throws<CheckpointException>(() => read(new StateReader(data ?? bytes, "a test group")));
            Assert.StartsWith("The checkpoint's state of a test group is not what this version expects: ", ex.Message);
            return ex.Message;
        }
        Assert.Contains("found section 'WORD' where 'LONG' belongs.", Problem(x => x.Longs("LONG", 2)));
        Assert.Contains("section 'WORD' holds 2 values; expected 3.", Problem(x => x.Words("WORD", 3)));
        Assert.Contains("section 'WORD' holds 2 values; expected 0 to 1.", Problem(x => x.Words("WORD", -1, 1)));
        Assert.Contains("section 'WORD' is missing.", Problem(x => x.Words("WORD", 2), bytes[..11]));
        Assert.Contains("section 'WORD' is cut short.", Problem(x => x.Words("WORD", 2), bytes[..27]));
        Assert.Contains("92 bytes are left after the last section.", Problem(x => x.End()));
        Assert.Contains("section 'WORD' holds 2 values; expected 0.", Problem(x => x.Words("WORD", 0)));
        // Past the first section (28 bytes): what is left is counted from there, and a stub of a header is "missing".
        Assert.Contains("64 bytes are left after the last section.", Problem(x =>
        {
            x.Words("WORD", 2);
            x.End();
        }));
        Assert.Contains("section 'DBLS' is missing.", Problem(x =>
        {
            x.Words("WORD", 2);
            x.Doubles("DBLS", 3);
        }, bytes[..(28 + 11)]));
        Assert.Contains("the phase = 3 is outside 0 to 2.", Problem(x => x.InRange(3, 0, 2, "the phase")));
        Assert.Contains("the phase = -1 is outside 0 to 2.", Problem(x => x.InRange(-1, 0, 2, "the phase")));
        var inRange = new StateReader(bytes, "a test group");
        Assert.Equal(0, inRange.InRange(0, 0, 2, "the phase"));
        Assert.Equal(2, inRange.InRange(2, 0, 2, "the phase"));
        // A count that would overflow the remaining bytes is refused, not allocated.
        var huge = new StateWriter();
        huge.Words("HUGE", []);
        var hugeBytes = huge.ToArray();
        BinaryPrimitives.WriteInt64LittleEndian(hugeBytes.AsSpan(4), long.MaxValue / 4);
        Assert.Contains("section 'HUGE' is cut short.", Problem(x => x.Words("HUGE", -1, long.MaxValue), hugeBytes));
    }

    [Fact]
    public void Checkpoint_options_check_their_interval_folder_and_sink()
    {
        Assert.Equal(TimeSpan.Zero, new CheckpointOptions(TimeSpan.Zero, _ => { }).Interval);
        Assert.Equal(TimeSpan.FromDays(1), new CheckpointOptions(TimeSpan.FromDays(1), _ => { }).Interval);
        foreach (var bad in new[] { TimeSpan.FromTicks(-1), TimeSpan.FromDays(1) + TimeSpan.FromTicks(1) })
        {
            var ex = Assert.Throws<ArgumentOutOfRangeException>(() => new CheckpointOptions(bad, _ => { }));
            Assert.Equal("interval", ex.ParamName);
            Assert.Contains("valid: 0 to 1 day", ex.Message);
        }
        Assert.Equal("save", Assert.Throws<ArgumentNullException>(() => new CheckpointOptions(TimeSpan.Zero, null!)).ParamName);
        string missing = Path.Combine(Path.GetTempPath(), "ts-no-such-folder-" + Guid.NewGuid().ToString("N"), "run.checkpoint");
        var folder = Assert.Throws<ArgumentException>(() => CheckpointOptions.ToFile(missing, TimeSpan.FromMinutes(5)));
        Assert.Equal("path", folder.ParamName);
        Assert.Contains("does not exist", folder.Message);
        Assert.ThrowsAny<ArgumentException>(() => CheckpointOptions.ToFile(" ", TimeSpan.FromMinutes(5)));
        var options = CheckpointOptions.ToFile(Path.Combine(Path.GetTempPath(), "run.checkpoint"), TimeSpan.FromMinutes(5));
        Assert.Equal(TimeSpan.FromMinutes(5), options.Interval);
        Assert.Null(options.ApplicationData);
        Assert.Contains("does not exist", Assert.Throws<CheckpointException>(() => SamplingCheckpoint.ReadFromFile(missing)).Message);
    }

    public static TheoryData<string, Func<SamplingSettings, SamplingSettings>, string> SettingChanges => new()
    {
        { "Method", s => s with { Method = SamplingMethod.Metropolis }, "its Method is Direct, and this run's is Metropolis." },
        { "Chains", s => s with { Chains = 3 }, "its Chains is 2, and this run's is 3." },
        { "BurnIn", s => s with { BurnIn = 10 }, "its BurnIn is 0, and this run's is 10." },
        { "TargetAcceptance", s => s with { TargetAcceptance = 0.3 }, "its TargetAcceptance is null, and this run's is 0.3." },
        { "InitialStepWidthInAngstroms", s => s with { InitialStepWidthInAngstroms = 0.05 }, "its InitialStepWidthInAngstroms is null, and this run's is 0.05." },
        { "HistogramBins", s => s with { HistogramBins = 61 }, "its HistogramBins is 60, and this run's is 61." },
        { "MaxDiagnosticValuesPerChain", s => s with { MaxDiagnosticValuesPerChain = 1000 }, "its MaxDiagnosticValuesPerChain is 16384, and this run's is 1000." },
        { "RetainedDrawsPerChain", s => s with { RetainedDrawsPerChain = 5 }, "its RetainedDrawsPerChain is 0, and this run's is 5." },
    };

    [Theory]
    [MemberData(nameof(SettingChanges))]
    public void A_resume_with_any_other_setting_is_refused_naming_it(string name, Func<SamplingSettings, SamplingSettings> change, string sentence)
    {
        var settings = Direct();
        var checkpoint = Read(Sweep(settings)[0]);
        var ex = Assert.Throws<CheckpointException>(() => PairSampler.Resume(Line, Argon, TwoTemperatures, change(settings), checkpoint));
        Assert.Contains(sentence, ex.Message);
        Assert.StartsWith("The checkpoint belongs to a different run: ", ex.Message);
        Assert.EndsWith(" Resume with exactly the original landscape, mass, temperatures and settings.", ex.Message);
        Assert.Single(ex.Message.Split(" and this run's ").Skip(1)); // only this one difference
        Assert.Contains(name, sentence);
    }

    [Fact]
    public void A_checkpoint_resumes_only_with_its_own_number_of_chain_groups()
    {
        // Eight Metropolis chains four to a vector make two groups. Forging the lane width to 2 asks for four groups per
        // temperature, which the checkpoint does not hold.
        var settings = new SamplingSettings { Seed = 5, Chains = 8, SamplesPerChain = 3 * 4096, BurnIn = 0, MaxThreads = 1, ChainsPerVector = 4 };
        var file = Sweep(settings)[0];
        var (metadata, body) = Split(file);
        Assert.Equal(2, ParseBody(body)[0].Groups.Count);
        var forged = Read(Forge(Replace(metadata, "\"chainsPerVector\":4,\"temperaturesFinished\"", "\"chainsPerVector\":2,\"temperaturesFinished\""), body));
        Assert.Equal(2, forged.ChainsPerVector);
        var ex = Assert.Throws<CheckpointException>(() => PairSampler.Resume(Line, Argon, TwoTemperatures, settings, forged));
        Assert.Contains("The checkpoint holds 2 chain groups for temperature 1; this run has 4.", ex.Message);
    }
    [Fact]
    public void Every_setting_round_trips_through_the_metadata_including_the_optional_ones()
    {
        var full = new SamplingSettings
        {
            Seed = 5, Chains = 2, SamplesPerChain = 2 * 4096, BurnIn = 4096, TargetAcceptance = 0.3, InitialStepWidthInAngstroms = 0.05, HistogramBins = 31,
            MaxDiagnosticValuesPerChain = 512, RetainedDrawsPerChain = 7, MaxThreads = 1, ChainsPerVector = 2,
        };
        var file = Sweep(full)[0];
        Assert.Equal(full, Read(file).Settings);
        var settings = System.Text.Json.JsonDocument.Parse(Split(file).Metadata).RootElement.GetProperty("settings");
        Assert.Equal(0.3, settings.GetProperty("targetAcceptance").GetDouble());
        Assert.Equal(0.05, settings.GetProperty("initialStepWidthInAngstroms").GetDouble());
        Assert.Equal(1, settings.GetProperty("maxThreads").GetInt32());
        Assert.Equal(2, settings.GetProperty("chainsPerVector").GetInt32());
        // Unset optional values are written as null, not left out, and read back as unset.
        var plain = Sweep(Direct() with { MaxThreads = null })[0];
        Assert.Equal(Direct() with { MaxThreads = null }, Read(plain).Settings);
        var nulls = System.Text.Json.JsonDocument.Parse(Split(plain).Metadata).RootElement.GetProperty("settings");
        foreach (var name in new[] { "targetAcceptance", "initialStepWidthInAngstroms", "maxThreads", "chainsPerVector" })
        {
            Assert.Equal(System.Text.Json.JsonValueKind.Null, nulls.GetProperty(name).ValueKind);
        }
    }

    [Fact]
    public void The_written_time_has_the_documented_form()
    {
        using var json = System.Text.Json.JsonDocument.Parse(Split(Sweep(Direct())[0]).Metadata);
        Assert.Matches(@"^\d{4}-\d\d-\d\dT\d\d:\d\d:\d\d\.\d{3}Z$", json.RootElement.GetProperty("writtenUtc").GetString()!);
    }

    [Fact]
    public void A_refusal_for_several_differences_names_each_in_turn()
    {
        var checkpoint = Read(Sweep(Direct())[0]);
        var ex = Assert.Throws<CheckpointException>(() =>
            PairSampler.Resume(Line, Argon, [Temperature.FromKelvin(30), Temperature.FromKelvin(61)], Direct() with { Chains = 3 }, checkpoint));
        Assert.Equal("The checkpoint belongs to a different run: its temperatures are [30, 60] K, and this run's are [30, 61] K. its Chains is 2, and this run's is 3."
            + " Resume with exactly the original landscape, mass, temperatures and settings.", ex.Message);
    }

    [Fact]
    public void Missing_streams_and_paths_are_refused_naming_the_parameter()
    {
        var checkpoint = Read(Sweep(Direct())[0]);
        Assert.Equal("stream", Assert.Throws<ArgumentNullException>(() => checkpoint.WriteTo(null!)).ParamName);
        Assert.Equal("stream", Assert.Throws<ArgumentNullException>(() => SamplingCheckpoint.ReadFrom(null!)).ParamName);
        Assert.Equal("path", Assert.Throws<ArgumentNullException>(() => checkpoint.WriteToFile(null!)).ParamName);
        Assert.Equal("path", Assert.Throws<ArgumentException>(() => checkpoint.WriteToFile("  ")).ParamName);
        Assert.Equal("path", Assert.Throws<ArgumentNullException>(() => SamplingCheckpoint.ReadFromFile(null!)).ParamName);
        Assert.Equal("path", Assert.Throws<ArgumentException>(() => SamplingCheckpoint.ReadFromFile("  ")).ParamName);
    }

    [Fact]
    public void Writing_to_a_stream_flushes_it()
    {
        var file = Sweep(Direct())[0];
        var inner = new MemoryStream();
        using var buffered = new BufferedStream(inner, 1 << 20);
        Read(file).WriteTo(buffered);
        Assert.Equal(file.Length, inner.Length); // a buffered stream's bytes reach what it wraps
    }

    [Fact]
    public void A_metadata_line_may_be_as_long_as_the_limit_and_no_longer()
    {
        // The limit is 32 MiB before the newline (docs/checkpoints.md). JSON allows the padding after the opening brace.
        const int limit = 32 * 1024 * 1024;
        var (metadata, body) = Split(Sweep(Direct())[0]);
        string Padded(int length) => "{" + new string(' ', length - Encoding.UTF8.GetByteCount(metadata)) + metadata[1..]; // bytes, not characters: "Å" takes two
        Assert.Equal(Read(Sweep(Direct())[0]).ChainStepsDone, Read(Forge(Padded(limit), body)).ChainStepsDone);
        Assert.Equal($"The checkpoint's metadata line is longer than {limit} bytes: this is not a checkpoint.", Refusal(Forge(Padded(limit + 1), body)));
    }

    [Fact]
    public void Empty_and_cut_short_metadata_lines_are_told_apart()
    {
        Assert.Equal("The checkpoint is empty.", Refusal([]));
        Assert.Equal("The checkpoint is cut short inside its metadata line.", Refusal(Encoding.UTF8.GetBytes("{\"format\":")));
        // A zero byte is data, not the end: a file that starts with one is damaged, not empty.
        Assert.Contains("is not valid JSON", Refusal([0, .. Sweep(Direct())[0]]));
    }

    [Fact]
    public void A_body_shorter_than_announced_is_measured_before_it_is_read()
    {
        var (metadata, body) = Split(Sweep(Direct())[0]);
        string Announcing(long bytes) => Replace(metadata, "\"bodyBytes\":" + body.Length, "\"bodyBytes\":" + bytes);
        // One byte more than the file holds: refused from the stream's length, naming both counts.
        Assert.Contains($"The checkpoint is cut short: {body.Length + 32} bytes follow the metadata, which announces {body.Length + 1} + 32 (body and checksum).",
            Refusal(Forge(Announcing(body.Length + 1), body, fixBodyBytes: false)));
        // The largest body an array can hold is a length the format allows; this file is just too short for it.
        Assert.Contains("The checkpoint is cut short: ", Refusal(Forge(Announcing(Array.MaxLength), body, fixBodyBytes: false)));
        Assert.Contains("announces a body of " + (Array.MaxLength + 1L), Refusal(Forge(Announcing(Array.MaxLength + 1L), body, fixBodyBytes: false)));
    }

    [Fact]
    public void A_checkpoint_with_no_temperatures_is_refused()
    {
        var (metadata, _) = Split(Sweep(Direct())[0]);
        Assert.Equal("The checkpoint lists no temperatures; a sweep has at least one.", Refusal(Forge(Replace(metadata, "\"temperaturesInKelvin\":[30,60]", "\"temperaturesInKelvin\":[]"), [])));
    }

    [Fact]
    public void Streams_that_cannot_seek_are_read_in_whatever_pieces_they_give()
    {
        var file = Sweep(Direct())[1];
        var (metadata, body) = Split(file);
        int newline = Array.IndexOf(file, (byte)'\n');
        // A pipe that hands out 7 (or, should the body's length divide by 7, 11) bytes at a time: neither the body nor the
        // checksum is a whole number of pieces.
        int piece = body.Length % 7 != 0 ? 7 : 11;
        Assert.NotEqual(0, body.Length % piece);
        Assert.Equal(Read(file).ChainStepsDone, SamplingCheckpoint.ReadFrom(new CheckpointTests.ForwardOnlyStream(file, most: piece)).ChainStepsDone);
        string Cut(byte[] bytes) => Assert.Throws<CheckpointException>(() => SamplingCheckpoint.ReadFrom(new CheckpointTests.ForwardOnlyStream(bytes))).Message;
        Assert.StartsWith($"The checkpoint is cut short in its body: 100 of {body.Length} bytes.", Cut(file[..(newline + 1 + 100)]));
        Assert.StartsWith("The checkpoint is cut short in its checksum: 10 of 32 bytes.", Cut(file[..(newline + 1 + body.Length + 10)]));
        // An announced body of 2 GB on a short pipe: refused after reading what is there, without allocating the 2 GB.
        var huge = Forge(Replace(metadata, "\"bodyBytes\":" + body.Length, "\"bodyBytes\":2000000000"), body, fixBodyBytes: false);
        long before = GC.GetAllocatedBytesForCurrentThread();
        Assert.StartsWith($"The checkpoint is cut short in its body: {body.Length + 32} of 2000000000 bytes.", Cut(huge));
        Assert.InRange(GC.GetAllocatedBytesForCurrentThread() - before, 0, 16 << 20);
    }

    /// <summary>The body with its layout rebuilt from <paramref name="layout"/> (the inverse of <see cref="ParseBody"/>).</summary>
    private static byte[] BuildBody(List<(byte Status, List<Group> Groups)> layout)
    {
        var body = new List<byte>();
        foreach (var (status, groups) in layout)
        {
            body.Add(status);
            if (status == 0)
            {
                continue;
            }
            body.AddRange(Long(groups.Count));
            foreach (var g in groups)
            {
                body.AddRange(Long(g.Steps));
                body.AddRange(Long(g.State?.Length ?? -1));
                body.AddRange(g.State ?? []);
            }
        }
        body.AddRange(Long(-1)); // no temperature ladder
        return [.. body];
    }

    [Fact]
    public void A_state_of_zero_bytes_is_read_as_a_state_and_refused_when_it_is_loaded()
    {
        // An empty state is not "no state": no state restarts the chain, an empty one is a damaged chain and must not.
        var files = Sweep(Direct());
        var (metadata, body) = Split(files.Last(f => ParseBody(Split(f).Body).Any(t => t.Status == 2) && ParseBody(Split(f).Body).Any(t => t.Status == 1)));
        Assert.Equal(body, BuildBody(ParseBody(body)));
        foreach (int temperature in new[] { 0, 1 }) // the finished temperature, then the running one
        {
            var layout = ParseBody(body);
            layout[temperature].Groups[0] = layout[temperature].Groups[0] with { State = [] };
            var forged = Read(Forge(metadata, BuildBody(layout)));
            var ex = Assert.Throws<CheckpointException>(() => PairSampler.Resume(Line, Argon, TwoTemperatures, Direct(), forged));
            Assert.Equal("The checkpoint's state of direct chain 0 is not what this version expects: section 'RAND' is missing.", ex.Message);
        }
    }

    [Fact]
    public void A_body_cut_inside_a_later_number_is_refused_as_ending_early()
    {
        var (metadata, body) = Split(Sweep(Direct())[0]);
        // The status byte, the group count, then four bytes of group 0's steps.
        Assert.Contains("body ends early (its metadata and body disagree).", Refusal(Forge(metadata, body[..(1 + 8 + 4)])));
    }

    public static TheoryData<int, long, string> GroupHeaderForgeries => new()
    {
        { 0, 2, "the lanes per vector = 2 is outside 1 to 1." },
        { 1, 2, "the chains of the group = 2 is outside 1 to 1." },
        { 1, 0, "the chains of the group = 0 is outside 1 to 1." },
        { 2, 3, "the phase = 3 is outside 0 to 2." },
        { 3, 2 * 4096 + 1, "the step = 8193 is outside 0 to 8192." }, // in burn-in: up to BurnIn, although SamplesPerChain is larger
        { 4, 4096, "the open moment block = 4096 is outside 0 to 4095." },
        { 5, 48, "the open batch = 48 is outside 0 to 47." }, // ⌈12 288 samples / 256 values⌉ = 48 steps per batch
    };

    [Theory]
    [MemberData(nameof(GroupHeaderForgeries))]
    public void A_signed_file_whose_lane_group_header_is_out_of_range_is_refused_naming_the_field(int field, long value, string message)
    {
        // One Metropolis chain in a one-lane vector; the first checkpoint comes in burn-in, at 4096 of its 8192 steps.
        var settings = new SamplingSettings
        {
            Seed = 5, Chains = 1, SamplesPerChain = 3 * 4096, BurnIn = 2 * 4096, MaxThreads = 1, ChainsPerVector = 1, MaxDiagnosticValuesPerChain = 256,
        };
        var (metadata, body) = Split(Sweep(settings)[0]);
        // The pair lane group's header section: tag "PLGH", count 6, then width, chains, phase, step, open block, open batch.
        int at = body.AsSpan().IndexOf("PLGH"u8);
        Assert.True(at > 0);
        Assert.Equal(6, BinaryPrimitives.ReadInt64LittleEndian(body.AsSpan(at + 4)));
        int value0 = at + 12;
        Assert.Equal(new long[] { 1, 1, 0, 4096 }, Enumerable.Range(0, 4).Select(i => BinaryPrimitives.ReadInt64LittleEndian(body.AsSpan(value0 + 8 * i))));
        var forged = (byte[])body.Clone();
        BinaryPrimitives.WriteInt64LittleEndian(forged.AsSpan(value0 + 8 * field), value);
        var checkpoint = Read(Forge(metadata, forged));
        var ex = Assert.Throws<CheckpointException>(() => PairSampler.Resume(Line, Argon, TwoTemperatures, settings, checkpoint));
        Assert.StartsWith("The checkpoint's state of ", ex.Message);
        Assert.EndsWith(message, ex.Message);
    }
}
