using System;
using System.Collections.Generic;
using System.Collections.Immutable;
using System.Globalization;
using System.IO;
using System.Linq;
using System.Text.Json;
using ThermalSampling.Persistence;
using ThermalSampling.Units;

namespace ThermalSampling.Sampling;

/// <summary>
/// The records of a run's chains at one temperature (all of them, or a contiguous range for a run split into parts),
/// with what they were sampled from: the landscape's identity, the temperature and the settings. Records of parts of one
/// run merge exactly (<see cref="Merge"/>): the merged record summarises to the same bits as the one-process run. A
/// record is written and read in the library's signed framing (a JSON metadata line, the body, SHA-256 of both).
/// Build the report from it with <c>PairSampler.Summarise</c> or <c>SiteSampler.Summarise</c>.
/// </summary>
public sealed class TemperatureRecord
{
    /// <summary>The first metadata key of a record file.</summary>
    public const string FormatName = "thermal-sampling-record";

    /// <summary>The layout version this library writes and reads.</summary>
    public const int FormatVersion = 4;

    internal TemperatureRecord(string landscapeKind, string landscape, string landscapeFingerprint, Temperature temperature, SamplingSettings settings,
        double targetAcceptance, double proposalUnitInAngstroms, RecordLayout layout, ImmutableArray<ChainRecord> chains, string libraryVersion)
    {
        (LandscapeKind, Landscape, LandscapeFingerprint, Temperature, Settings) = (landscapeKind, landscape, landscapeFingerprint, temperature, settings);
        (TargetAcceptance, ProposalUnitInAngstroms, Layout, Chains, LibraryVersion) = (targetAcceptance, proposalUnitInAngstroms, layout, chains, libraryVersion);
    }

    /// <summary><c>pair</c> or <c>sites</c>.</summary>
    public string LandscapeKind { get; }

    /// <summary>The landscape's description.</summary>
    public string Landscape { get; }

    /// <summary>SHA-256 (hex) of the landscape's geometry and energies: a record summarises only with the landscape it was sampled in.</summary>
    public string LandscapeFingerprint { get; }

    /// <summary>The temperature the chains sampled.</summary>
    public Temperature Temperature { get; }

    /// <summary>The run's settings (its chain count is the whole run's, whether or not this record holds every chain).</summary>
    public SamplingSettings Settings { get; }

    /// <summary>The Metropolis target acceptance the widths adapted to.</summary>
    public double TargetAcceptance { get; }

    /// <summary>The library version that sampled the chains.</summary>
    public string LibraryVersion { get; }

    /// <summary>The chains' records in chain order: a contiguous range of the run's chains.</summary>
    public ImmutableArray<ChainRecord> Chains { get; }

    /// <summary>Whether the record holds every chain of the run (only then does it summarise).</summary>
    public bool IsComplete => Chains.Length == Settings.Chains && Chains[0].Chain == 0;

    /// <summary>The unit of a site walk's proposal scale (the smallest harmonic mode's RMS spread), Å; 1 for pairs.</summary>
    internal double ProposalUnitInAngstroms { get; }

    internal RecordLayout Layout { get; }

    /// <summary>
    /// Joins records of parts of one run (the same landscape, temperature, settings and library version, disjoint chain
    /// ranges) into one record, chains in chain order. The result is bit for bit the record the whole run would give.
    /// </summary>
    /// <param name="parts">At least one record.</param>
    /// <exception cref="ArgumentException">When the parts come from different runs (the message names the first difference), or two hold the same chain.</exception>
    public static TemperatureRecord Merge(IEnumerable<TemperatureRecord> parts)
    {
        Internal.Preconditions.CheckNotNull(parts, nameof(parts));
        var list = parts.ToList();
        if (list.Count == 0 || list.Any(p => p is null))
        {
            throw new ArgumentException("parts must hold at least one record and no null.", nameof(parts));
        }
        var first = list[0];
        for (int i = 1; i < list.Count; i++)
        {
            if (first.DifferenceFrom(list[i]) is string difference)
            {
                throw new ArgumentException(string.Create(CultureInfo.InvariantCulture, $"parts[{i}] comes from a different run than parts[0]: {difference}"), nameof(parts));
            }
        }
        var chains = list.SelectMany(p => p.Chains).OrderBy(c => c.Chain).ToImmutableArray();
        for (int i = 1; i < chains.Length; i++)
        {
            if (chains[i].Chain == chains[i - 1].Chain)
            {
                throw new ArgumentException(string.Create(CultureInfo.InvariantCulture, $"Chain {chains[i].Chain} is in more than one part."), nameof(parts));
            }
            if (chains[i].Chain != chains[i - 1].Chain + 1)
            {
                throw new ArgumentException(string.Create(CultureInfo.InvariantCulture,
                    $"The parts leave out chains {chains[i - 1].Chain + 1} to {chains[i].Chain - 1}; a merged record holds a contiguous range."), nameof(parts));
            }
        }
        return new TemperatureRecord(first.LandscapeKind, first.Landscape, first.LandscapeFingerprint, first.Temperature, first.Settings, first.TargetAcceptance,
            first.ProposalUnitInAngstroms, first.Layout, chains, first.LibraryVersion);
    }

    /// <summary>What differs between this record's run and <paramref name="other"/>'s, or null when they are parts of one run.</summary>
    private string? DifferenceFrom(TemperatureRecord other)
    {
        if (LibraryVersion != other.LibraryVersion)
        {
            return $"library version {other.LibraryVersion}, not {LibraryVersion}.";
        }
        if (LandscapeKind != other.LandscapeKind || LandscapeFingerprint != other.LandscapeFingerprint)
        {
            return $"landscape '{other.Landscape}' ({other.LandscapeKind}, fingerprint {other.LandscapeFingerprint[..12]}…), not '{Landscape}' ({LandscapeKind}, {LandscapeFingerprint[..12]}…).";
        }
        if (Temperature.InKelvin != other.Temperature.InKelvin)
        {
            return string.Create(CultureInfo.InvariantCulture, $"temperature {other.Temperature.InKelvin:R} K, not {Temperature.InKelvin:R} K.");
        }
        var differences = SettingsFields.Differences(Settings, other.Settings, (name, mine, theirs) => $"{name} {theirs} where parts[0] has {mine}.").ToList();
        if (differences.Count > 0)
        {
            return string.Join(" ", differences);
        }
        if (TargetAcceptance != other.TargetAcceptance || ProposalUnitInAngstroms != other.ProposalUnitInAngstroms || !Layout.SameAs(other.Layout))
        {
            return "the records' layouts differ (another landscape analysis).";
        }
        return null;
    }

    /// <summary>Writes the record (metadata line, body, SHA-256 of both).</summary>
    /// <param name="stream">A writable stream.</param>
    public void WriteTo(Stream stream)
    {
        ArgumentNullException.ThrowIfNull(stream);
        var body = new StateWriter();
        Layout.Save(body);
        foreach (var chain in Chains)
        {
            chain.Save(body);
        }
        SignedFile.Write(stream, FormatName, FormatVersion, w =>
        {
            w.WriteString("libraryVersion", LibraryVersion);
            w.WriteString("landscapeKind", LandscapeKind);
            w.WriteString("landscape", Landscape);
            w.WriteString("landscapeFingerprint", LandscapeFingerprint);
            w.WriteNumber("temperatureInKelvin", Temperature.InKelvin);
            w.WritePropertyName("settings");
            SweepIdentity.WriteSettings(w, Settings);
            w.WriteNumber("targetAcceptance", TargetAcceptance);
            w.WriteNumber("proposalUnitInAngstroms", ProposalUnitInAngstroms);
            w.WriteNumber("firstChain", Chains[0].Chain);
            w.WriteNumber("chains", Chains.Length);
        }, body.ToArray());
    }

    /// <summary>Reads a record written by <see cref="WriteTo"/>; nothing is returned unless its length and checksum are right.</summary>
    /// <param name="stream">A readable stream positioned at the record's first byte.</param>
    /// <exception cref="CheckpointException">When the data is not a record file, is cut short, fails its checksum, or is inconsistent (the message says what).</exception>
    public static TemperatureRecord ReadFrom(Stream stream)
    {
        ArgumentNullException.ThrowIfNull(stream);
        const string What = "record file";
        var (meta, bytes) = SignedFile.Read(stream, What, FormatName, FormatVersion);
        try
        {
            return Parse(meta, bytes);
        }
        catch (Exception ex) when (ex is FormatException or InvalidOperationException or ArgumentException)
        {
            throw new CheckpointException("The record file's metadata has a value of the wrong kind: " + ex.Message, ex);
        }
    }

    private static TemperatureRecord Parse(JsonElement meta, byte[] bytes)
    {
        const string What = "record file";
        JsonElement Get(string name, JsonValueKind kind) => SignedFile.Get(meta, name, kind, What);
        var settings = SweepIdentity.ReadSettings(Get("settings", JsonValueKind.Object), What);
        double kelvin = Get("temperatureInKelvin", JsonValueKind.Number).GetDouble();
        if (!(kelvin > 0) || double.IsInfinity(kelvin))
        {
            throw new CheckpointException(string.Create(CultureInfo.InvariantCulture, $"The record file's temperatureInKelvin = {kelvin:R}; valid: positive and finite."));
        }
        int firstChain = Get("firstChain", JsonValueKind.Number).GetInt32();
        int count = Get("chains", JsonValueKind.Number).GetInt32();
        if (firstChain < 0 || count < 1 || (long)firstChain + count > settings.Chains)
        {
            throw new CheckpointException(string.Create(CultureInfo.InvariantCulture,
                $"The record file holds chains {firstChain} to {(long)firstChain + count - 1}, outside the run's {settings.Chains} chains."));
        }
        var r = new StateReader(bytes, "record file body");
        var layout = RecordLayout.Load(r);
        var chains = ImmutableArray.CreateBuilder<ChainRecord>(count);
        for (int c = 0; c < count; c++)
        {
            var chain = ChainRecord.Read(r, layout);
            if (chain.Chain != firstChain + c)
            {
                throw new CheckpointException(string.Create(CultureInfo.InvariantCulture, $"The record file holds chain {chain.Chain} where chain {firstChain + c} belongs."));
            }
            chains.Add(chain);
        }
        r.End();
        return new TemperatureRecord(Get("landscapeKind", JsonValueKind.String).GetString()!, Get("landscape", JsonValueKind.String).GetString()!,
            Get("landscapeFingerprint", JsonValueKind.String).GetString()!, Temperature.FromKelvin(kelvin), settings,
            Get("targetAcceptance", JsonValueKind.Number).GetDouble(), Get("proposalUnitInAngstroms", JsonValueKind.Number).GetDouble(), layout,
            chains.MoveToImmutable(), Get("libraryVersion", JsonValueKind.String).GetString()!);
    }

    /// <summary>Throws unless the record holds every chain and was sampled in a landscape of <paramref name="kind"/> with <paramref name="fingerprint"/>.</summary>
    internal void CheckSummarisable(string kind, string fingerprint, string what)
    {
        if (LandscapeKind != kind || LandscapeFingerprint != fingerprint)
        {
            throw new ArgumentException($"The record was sampled in '{Landscape}' ({LandscapeKind}), not in this {kind} landscape; summarise it with the landscape it came from.", what);
        }
        if (!IsComplete)
        {
            throw new ArgumentException(string.Create(CultureInfo.InvariantCulture,
                $"The record holds chains {Chains[0].Chain} to {Chains[^1].Chain} of {Settings.Chains}; merge the parts (TemperatureRecord.Merge) before summarising."), what);
        }
    }
}
