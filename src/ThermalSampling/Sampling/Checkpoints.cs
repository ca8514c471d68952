using System;
using System.Buffers.Binary;
using System.Collections.Generic;
using System.Collections.Immutable;
using System.Globalization;
using System.IO;
using System.Linq;
using System.Security.Cryptography;
using System.Text;
using System.Text.Json;
using ThermalSampling.Persistence;
using ThermalSampling.Units;

namespace ThermalSampling.Sampling;

/// <summary>
/// Where and how often a sweep writes checkpoints. A checkpoint is written as soon as every chain group has reached its
/// first chunk boundary, then every <see cref="Interval"/>, and once more when the run is cancelled (before
/// <see cref="OperationCanceledException"/> reaches the caller). Writing blocks only the chain group that completes the
/// set; the others keep sampling.
/// </summary>
public sealed class CheckpointOptions
{
    /// <summary>Checkpoints handed to <paramref name="save"/> (which may keep them in memory, send them elsewhere or write them).</summary>
    /// <param name="interval">Time between checkpoints, 0 to 1 day (0: at every chunk boundary, for tests).</param>
    /// <param name="save">Called with each checkpoint, on a worker thread, one call at a time; an exception from it stops the run.</param>
    public CheckpointOptions(TimeSpan interval, Action<SamplingCheckpoint> save)
    {
        ArgumentNullException.ThrowIfNull(save);
        if (interval < TimeSpan.Zero || interval > TimeSpan.FromDays(1))
        {
            throw new ArgumentOutOfRangeException(nameof(interval), interval, $"interval = {interval} is out of range; valid: 0 to 1 day.");
        }
        Interval = interval;
        Save = save;
    }

    /// <summary>Checkpoints written atomically to <paramref name="path"/> with <see cref="SamplingCheckpoint.WriteToFile"/>.</summary>
    /// <param name="path">The checkpoint file; its folder must exist.</param>
    /// <param name="interval">Time between checkpoints, 0 to 1 day.</param>
    public static CheckpointOptions ToFile(string path, TimeSpan interval)
    {
        ArgumentException.ThrowIfNullOrWhiteSpace(path);
        string full = Path.GetFullPath(path);
        string? folder = Path.GetDirectoryName(full);
        if (folder is null || !Directory.Exists(folder))
        {
            throw new ArgumentException($"path = '{path}': the folder '{folder}' does not exist.", nameof(path));
        }
        return new CheckpointOptions(interval, c => c.WriteToFile(full));
    }

    /// <summary>Time between checkpoints.</summary>
    public TimeSpan Interval { get; }

    /// <summary>Receives each checkpoint.</summary>
    public Action<SamplingCheckpoint> Save { get; }

    /// <summary>Text stored verbatim in every checkpoint (an application's own settings, such as a scenario file); at most 16 MiB of UTF-8.</summary>
    public string? ApplicationData { get; init; }
}

/// <summary>
/// The complete state of a sweep at one moment: every chain group's walk, random stream, adapted step width and
/// statistics, at its last chunk boundary (groups run independently, so each is at its own step). Resuming from it
/// finishes the same sweep: the reports are bit for bit those of the uninterrupted run. The file format (one line of
/// JSON metadata, a binary body, a SHA-256 checksum) is described in docs/checkpoints.md.
/// </summary>
public sealed class SamplingCheckpoint
{
    /// <summary>The "format" value that opens every checkpoint's metadata.</summary>
    public const string FormatName = "thermal-sampling-checkpoint";

    /// <summary>The version of the file layout this library writes and reads.</summary>
    public const int FormatVersion = 7;


    private readonly byte[]?[]?[] _states;
    private readonly long[]?[] _steps;
    private readonly bool[] _finished;

    internal SamplingCheckpoint(SweepIdentity identity, int lanes, byte[]?[]?[] states, long[]?[] steps, bool[] finished, string? applicationData)
    {
        Identity = identity;
        ChainsPerVector = lanes;
        _states = states;
        _steps = steps;
        _finished = finished;
        ApplicationData = applicationData;
    }

    internal SweepIdentity Identity { get; }

    /// <summary>A temperature ladder's swap state (streams, walkers, tallies), or null for a sweep without replica exchange.</summary>
    internal byte[]? LadderState { get; init; }

    /// <summary>The library version that wrote it; only the same version resumes it.</summary>
    public string LibraryVersion => Identity.LibraryVersion;

    /// <summary>"pair" (line or radial) or "sites".</summary>
    public string LandscapeKind => Identity.Kind;

    /// <summary>The landscape's description.</summary>
    public string Landscape => Identity.Landscape;

    /// <summary>The particle's mass.</summary>
    public Mass Mass => Mass.FromAtomicMassUnits(Identity.MassInAtomicMassUnits);

    /// <summary>The sweep's temperatures, in order.</summary>
    public ImmutableArray<Temperature> Temperatures => Identity.Temperatures.Select(Temperature.FromKelvin).ToImmutableArray();

    /// <summary>The sweep's settings.</summary>
    public SamplingSettings Settings => Identity.Settings;

    /// <summary>Metropolis chains per vector in every group; a resume uses the same.</summary>
    public int ChainsPerVector { get; }

    /// <summary>Temperatures whose chains have all finished.</summary>
    public int FinishedTemperatures => _finished.Count(f => f);

    /// <summary>Steps done, over all chains and temperatures (burn-in included).</summary>
    public long ChainStepsDone => _steps.Sum(s => s?.Sum() ?? 0);

    /// <summary>Steps the whole sweep takes, over all chains and temperatures.</summary>
    public long ChainStepsTotal => Identity.ChainStepsTotal;

    /// <summary>The text given as <see cref="CheckpointOptions.ApplicationData"/>, or null.</summary>
    public string? ApplicationData { get; }

    internal byte[]?[]?[] CopyStates() => _states.Select(s => (byte[]?[]?)s?.Clone()).ToArray();

    internal long[]?[] CopySteps() => _steps.Select(s => (long[]?)s?.Clone()).ToArray();

    internal bool[] CopyFinished() => (bool[])_finished.Clone();

    /// <summary>Throws a <see cref="CheckpointException"/> naming every way in which <paramref name="run"/> differs from what was checkpointed.</summary>
    internal void CheckBelongsTo(SweepIdentity run)
    {
        var differences = Identity.Differences(run);
        if (differences.Count > 0)
        {
            throw new CheckpointException("The checkpoint belongs to a different run: " + string.Join(" ", differences) + " Resume with exactly the original landscape, mass, temperatures and settings.");
        }
    }

    /// <summary>Writes the checkpoint to <paramref name="stream"/> (metadata line, body, SHA-256 of both).</summary>
    /// <param name="stream">A writable stream.</param>
    public void WriteTo(Stream stream)
    {
        ArgumentNullException.ThrowIfNull(stream);
        SignedFile.Write(stream, FormatName, FormatVersion, WriteMetadata, Body());
    }

    /// <summary>
    /// Writes the checkpoint to <paramref name="path"/> atomically: to a temporary file beside it, flushed to the disk,
    /// then renamed over the old one. A crash while writing leaves the previous checkpoint intact.
    /// </summary>
    /// <param name="path">The checkpoint file.</param>
    public void WriteToFile(string path)
    {
        ArgumentException.ThrowIfNullOrWhiteSpace(path);
        string temporary = path + ".writing";
        using (var file = new FileStream(temporary, FileMode.Create, FileAccess.Write, FileShare.None, 1 << 16))
        {
            WriteTo(file);
            file.Flush(flushToDisk: true);
        }
        File.Move(temporary, path, overwrite: true);
    }

    /// <summary>Reads a checkpoint written by <see cref="WriteToFile"/>.</summary>
    /// <param name="path">The checkpoint file.</param>
    /// <exception cref="CheckpointException">When the file is not a checkpoint, is cut short, fails its checksum, or comes from another format version.</exception>
    public static SamplingCheckpoint ReadFromFile(string path)
    {
        ArgumentException.ThrowIfNullOrWhiteSpace(path);
        if (!File.Exists(path))
        {
            throw new CheckpointException($"The checkpoint file '{path}' does not exist.");
        }
        using var file = new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.Read, 1 << 16);
        return ReadFrom(file);
    }

    /// <summary>Reads a checkpoint written by <see cref="WriteTo"/>; nothing is loaded unless the length and checksum are right.</summary>
    /// <param name="stream">A readable stream, positioned at the checkpoint's first byte.</param>
    /// <exception cref="CheckpointException">When the data is not a checkpoint, is cut short, fails its checksum, or comes from another format version.</exception>
    public static SamplingCheckpoint ReadFrom(Stream stream)
    {
        ArgumentNullException.ThrowIfNull(stream);
        var (meta, body) = SignedFile.Read(stream, "checkpoint", FormatName, FormatVersion);
        return Parse(meta, body);
    }

    private static JsonElement Get(JsonElement meta, string name, JsonValueKind kind) => SignedFile.Get(meta, name, kind, "checkpoint");

    private byte[] Body()
    {
        var body = new MemoryStream();
        var word = new byte[8];
        void Long(long v)
        {
            BinaryPrimitives.WriteInt64LittleEndian(word, v);
            body.Write(word);
        }
        for (int t = 0; t < _states.Length; t++)
        {
            var groups = _states[t];
            body.WriteByte((byte)(groups is null ? 0 : _finished[t] ? 2 : 1));
            if (groups is null)
            {
                continue;
            }
            Long(groups.Length);
            for (int g = 0; g < groups.Length; g++)
            {
                Long(_steps[t]?[g] ?? 0);
                Long(groups[g]?.Length ?? -1);
                body.Write(groups[g] ?? []);
            }
        }
        Long(LadderState?.Length ?? -1);
        body.Write(LadderState ?? []);
        return body.ToArray();
    }

    private void WriteMetadata(Utf8JsonWriter w)
    {
        w.WriteString("libraryVersion", Identity.LibraryVersion);
        w.WriteString("landscapeKind", Identity.Kind);
        w.WriteString("landscape", Identity.Landscape);
        w.WriteString("landscapeFingerprint", Identity.Fingerprint);
        w.WriteNumber("massInAtomicMassUnits", Identity.MassInAtomicMassUnits);
        w.WriteStartArray("temperaturesInKelvin");
        foreach (double t in Identity.Temperatures)
        {
            w.WriteNumberValue(t);
        }
        w.WriteEndArray();
        w.WritePropertyName("settings");
        SweepIdentity.WriteSettings(w, Identity.Settings);
        w.WriteNumber("chainsPerVector", ChainsPerVector);
        w.WriteNumber("temperaturesFinished", FinishedTemperatures);
        w.WriteNumber("chainStepsDone", ChainStepsDone);
        w.WriteNumber("chainStepsTotal", ChainStepsTotal);
        w.WriteString("writtenUtc", DateTimeOffset.UtcNow.ToString("yyyy-MM-ddTHH:mm:ss.fffZ", CultureInfo.InvariantCulture));
        if (ApplicationData is null)
        {
            w.WriteNull("applicationData");
        }
        else
        {
            w.WriteString("applicationData", ApplicationData);
        }
    }

    private static SamplingCheckpoint Parse(JsonElement meta, byte[] body)
    {
        SweepIdentity identity;
        int lanes;
        string? application;
        try
        {
            var temperatures = Get(meta, "temperaturesInKelvin", JsonValueKind.Array).EnumerateArray().Select(e => e.GetDouble()).ToImmutableArray();
            identity = new SweepIdentity(Get(meta, "landscapeKind", JsonValueKind.String).GetString()!, Get(meta, "landscape", JsonValueKind.String).GetString()!,
                Get(meta, "landscapeFingerprint", JsonValueKind.String).GetString()!, Get(meta, "massInAtomicMassUnits", JsonValueKind.Number).GetDouble(),
                temperatures, SweepIdentity.ReadSettings(Get(meta, "settings", JsonValueKind.Object)), Get(meta, "libraryVersion", JsonValueKind.String).GetString()!);
            lanes = Get(meta, "chainsPerVector", JsonValueKind.Number).GetInt32();
            application = !meta.TryGetProperty("applicationData", out var a) ? null : a.ValueKind switch
            {
                JsonValueKind.Null => null,
                JsonValueKind.String => a.GetString(),
                _ => throw new CheckpointException($"The checkpoint's \"applicationData\" is a {a.ValueKind}; valid: a string or null."),
            };
        }
        catch (Exception ex) when (ex is FormatException or InvalidOperationException or ArgumentException)
        {
            throw new CheckpointException("The checkpoint's metadata has a value of the wrong kind: " + ex.Message, ex);
        }
        if (lanes is not (1 or 2 or 4 or 8))
        {
            throw new CheckpointException(string.Create(CultureInfo.InvariantCulture, $"The checkpoint's chainsPerVector = {lanes}; valid: 1, 2, 4 or 8."));
        }
        int n = identity.Temperatures.Length;
        if (n == 0)
        {
            throw new CheckpointException("The checkpoint lists no temperatures; a sweep has at least one.");
        }
        var states = new byte[]?[]?[n];
        var steps = new long[]?[n];
        var finished = new bool[n];
        int at = 0;
        long Long()
        {
            if (body.Length - at < 8)
            {
                throw new CheckpointException("The checkpoint's body ends early (its metadata and body disagree).");
            }
            long v = BinaryPrimitives.ReadInt64LittleEndian(body.AsSpan(at));
            at += 8;
            return v;
        }
        for (int t = 0; t < n; t++)
        {
            if (at >= body.Length)
            {
                throw new CheckpointException("The checkpoint's body ends before its last temperature.");
            }
            int status = body[at++];
            if (status > 2)
            {
                throw new CheckpointException(string.Create(CultureInfo.InvariantCulture, $"The checkpoint's temperature {t + 1} has status {status}; valid: 0, 1 or 2."));
            }
            finished[t] = status == 2;
            if (status == 0)
            {
                continue;
            }
            long groups = Long();
            if (groups < 1 || groups > identity.Settings.Chains)
            {
                throw new CheckpointException(string.Create(CultureInfo.InvariantCulture, $"The checkpoint's temperature {t + 1} has {groups} chain groups; valid: 1 to {identity.Settings.Chains}."));
            }
            states[t] = new byte[]?[groups];
            steps[t] = new long[groups];
            for (int g = 0; g < groups; g++)
            {
                steps[t]![g] = Long();
                long length = Long();
                if (length < -1 || length > body.Length - at || (finished[t] && length < 0))
                {
                    throw new CheckpointException(string.Create(CultureInfo.InvariantCulture, $"The checkpoint's state of group {g} at temperature {t + 1} has length {length}, which does not fit the body."));
                }
                states[t]![g] = length < 0 ? null : body.AsSpan(at, (int)length).ToArray();
                at += (int)Math.Max(length, 0);
            }
        }
        long ladderLength = Long();
        if (ladderLength < -1 || ladderLength > body.Length - at)
        {
            throw new CheckpointException(string.Create(CultureInfo.InvariantCulture, $"The checkpoint's temperature-ladder state has length {ladderLength}, which does not fit the body."));
        }
        byte[]? ladder = ladderLength < 0 ? null : body.AsSpan(at, (int)ladderLength).ToArray();
        at += (int)Math.Max(ladderLength, 0);
        if (at != body.Length)
        {
            throw new CheckpointException("The checkpoint's body has bytes after its temperature-ladder state.");
        }
        return new SamplingCheckpoint(identity, lanes, states, steps, finished, application) { LadderState = ladder };
    }
}

/// <summary>Everything that makes two sweeps the same run: a checkpoint is resumed only by a run with the same identity.</summary>
/// <param name="Kind">"pair" or "sites".</param>
/// <param name="Landscape">The landscape's description.</param>
/// <param name="Fingerprint">SHA-256 (hex) of the landscape's exact geometry and of its energies at fixed points.</param>
/// <param name="MassInAtomicMassUnits">The mass.</param>
/// <param name="Temperatures">The temperatures, K.</param>
/// <param name="Settings">The settings (worker threads and chains per vector do not change results and are not compared).</param>
/// <param name="LibraryVersion">The library version.</param>
internal sealed record SweepIdentity(string Kind, string Landscape, string Fingerprint, double MassInAtomicMassUnits, ImmutableArray<double> Temperatures,
    SamplingSettings Settings, string LibraryVersion)
{
    internal long ChainStepsPerTemperature => Settings.Chains * ((Settings.Method == SamplingMethod.Metropolis ? Settings.BurnIn : 0) + Settings.SamplesPerChain);

    internal long ChainStepsTotal => ChainStepsPerTemperature * Temperatures.Length;

    /// <summary>The fingerprint of a sequence of exact numbers.</summary>
    internal static string FingerprintOf(IEnumerable<double> values)
    {
        using var hash = IncrementalHash.CreateHash(HashAlgorithmName.SHA256);
        var word = new byte[8];
        foreach (double v in values)
        {
            BinaryPrimitives.WriteUInt64LittleEndian(word, BitConverter.DoubleToUInt64Bits(v));
            hash.AppendData(word);
        }
        return Convert.ToHexString(hash.GetHashAndReset()).ToLowerInvariant();
    }

    /// <summary>Each difference between this (the checkpoint) and <paramref name="run"/>, as a sentence.</summary>
    internal List<string> Differences(SweepIdentity run)
    {
        var c = CultureInfo.InvariantCulture;
        var list = new List<string>();
        if (LibraryVersion != run.LibraryVersion)
        {
            list.Add($"it was written by library version {LibraryVersion}, and this is {run.LibraryVersion}.");
        }
        if (Kind != run.Kind)
        {
            list.Add($"it is of a {Kind} landscape, and this run is of a {run.Kind} landscape.");
        }
        else if (Fingerprint != run.Fingerprint)
        {
            list.Add($"its landscape ({Landscape}) differs from this run's ({run.Landscape}) in its potential, window, sites or confinement.");
        }
        if (MassInAtomicMassUnits.CompareTo(run.MassInAtomicMassUnits) != 0)
        {
            list.Add(string.Format(c, "its mass is {0:R} u, and this run's is {1:R} u.", MassInAtomicMassUnits, run.MassInAtomicMassUnits));
        }
        if (!Temperatures.SequenceEqual(run.Temperatures))
        {
            list.Add(string.Format(c, "its temperatures are [{0}] K, and this run's are [{1}] K.",
                string.Join(", ", Temperatures.Select(t => t.ToString("R", c))), string.Join(", ", run.Temperatures.Select(t => t.ToString("R", c)))));
        }
        list.AddRange(SettingsFields.Differences(Settings, run.Settings));
        return list;
    }

    internal static void WriteSettings(Utf8JsonWriter w, SamplingSettings s) => SettingsFields.Write(w, s);

    internal static SamplingSettings ReadSettings(JsonElement e, string what = "checkpoint") => SettingsFields.Read(e, what);
}
