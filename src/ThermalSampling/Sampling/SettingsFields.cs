using System;
using System.Collections.Generic;
using System.Collections.Immutable;
using System.Globalization;
using System.Linq;
using System.Text.Json;
using ThermalSampling.Persistence;

namespace ThermalSampling.Sampling;

/// <summary>
/// Every <see cref="SamplingSettings"/> field, declared once: its name in C# and in JSON, its valid range (as a test and
/// as the words of the message), whether it changes results (and so must match between a checkpoint or a record and the
/// run it continues), and how it is read from and written to JSON. Validation, identity comparison and the checkpoint
/// and record metadata all walk this one list; a new setting is one entry here.
/// </summary>
internal static class SettingsFields
{
    /// <summary>One setting.</summary>
    /// <param name="Name">The property name (messages use it).</param>
    /// <param name="JsonName">The key in checkpoint and record metadata.</param>
    /// <param name="ChangesResults">Whether two runs that differ in it give different numbers (thread count and lane width do not).</param>
    /// <param name="Valid">Whether the value is valid.</param>
    /// <param name="Range">The valid range, in words.</param>
    /// <param name="Text">The value as text (invariant, round-trip).</param>
    /// <param name="Write">Writes the value under <paramref name="JsonName"/>.</param>
    /// <param name="Read">The settings with the value read from a JSON element (absent or null where the setting allows null).</param>
    internal sealed record Field(string Name, string JsonName, bool ChangesResults, Func<SamplingSettings, bool> Valid, string Range,
        Func<SamplingSettings, string> Text, Action<Utf8JsonWriter, SamplingSettings> Write, Func<SamplingSettings, JsonElement?, SamplingSettings> Read);

    private static readonly CultureInfo C = CultureInfo.InvariantCulture;

    /// <summary>The fields, in the order they are written and reported.</summary>
    internal static readonly ImmutableArray<Field> All =
    [
        new("Seed", "seed", true, _ => true, "0 to 2^64 − 1", s => s.Seed.ToString(C),
            (w, s) => w.WriteNumber("seed", s.Seed), (s, e) => s with { Seed = Required(e, "seed").GetUInt64() }),
        new("Method", "method", true, s => Enum.IsDefined(s.Method), "Metropolis or Direct", s => s.Method.ToString(),
            (w, s) => w.WriteString("method", s.Method.ToString()), (s, e) => s with { Method = ReadMethod(Required(e, "method")) }),
        Integer("Chains", "chains", true, 1, 1024, "1 to 1024", s => s.Chains, (s, v) => s with { Chains = (int)v }),
        Integer("SamplesPerChain", "samplesPerChain", true, 10, 1_000_000_000_000, "10 to 10^12", s => s.SamplesPerChain, (s, v) => s with { SamplesPerChain = v }),
        Integer("BurnIn", "burnIn", true, 0, 1_000_000_000_000, "0 to 10^12", s => s.BurnIn, (s, v) => s with { BurnIn = v }),
        Real("TargetAcceptance", "targetAcceptance", v => v > 0 && v < 1, "null or strictly between 0 and 1", s => s.TargetAcceptance, (s, v) => s with { TargetAcceptance = v }),
        Real("InitialStepWidthInAngstroms", "initialStepWidthInAngstroms", v => double.IsFinite(v) && v > 0, "null or finite and greater than 0",
            s => s.InitialStepWidthInAngstroms, (s, v) => s with { InitialStepWidthInAngstroms = v }),
        Integer("HistogramBins", "histogramBins", true, 4, 10_000, "4 to 10000", s => s.HistogramBins, (s, v) => s with { HistogramBins = (int)v }),
        new("SiteDistributionHalfWidthInSigmas", "siteDistributionHalfWidthInSigmas", true, s => s.SiteDistributionHalfWidthInSigmas is >= 2 and <= 100,
            "2 to 100", s => s.SiteDistributionHalfWidthInSigmas.ToString("R", C), (w, s) => w.WriteNumber("siteDistributionHalfWidthInSigmas", s.SiteDistributionHalfWidthInSigmas),
            (s, e) => s with { SiteDistributionHalfWidthInSigmas = Required(e, "siteDistributionHalfWidthInSigmas").GetDouble() }),
        Integer("MaxDiagnosticValuesPerChain", "maxDiagnosticValuesPerChain", true, 64, 10_000_000, "64 to 10^7", s => s.MaxDiagnosticValuesPerChain,
            (s, v) => s with { MaxDiagnosticValuesPerChain = (int)v }),
        Integer("RetainedDrawsPerChain", "retainedDrawsPerChain", true, 0, 10_000_000, "0 to 10^7", s => s.RetainedDrawsPerChain, (s, v) => s with { RetainedDrawsPerChain = (int)v }),
        new("ScatteringVectorsInInverseAngstroms", "scatteringVectorsInInverseAngstroms", true,
            s => s.ScatteringVectorsInInverseAngstroms.IsDefault || (s.ScatteringVectorsInInverseAngstroms.Length <= MaxScatteringValues
                && s.ScatteringVectorsInInverseAngstroms.All(q => double.IsFinite(q) && Math.Abs(q) <= MaxScatteringVector)),
            "at most 192 values, each finite and between −1000 and 1000", s => string.Join(",", Waves(s).Select(q => q.ToString("R", C))),
            (w, s) =>
            {
                w.WriteStartArray("scatteringVectorsInInverseAngstroms");
                foreach (double q in Waves(s))
                {
                    w.WriteNumberValue(q);
                }
                w.WriteEndArray();
            },
            (s, e) => s with { ScatteringVectorsInInverseAngstroms = [.. Required(e, "scatteringVectorsInInverseAngstroms").EnumerateArray().Select(v => v.GetDouble())] }),
        new("SwapInterval", "swapInterval", true, s => s.SwapInterval is not int v || (v is >= 1 and <= 1_000_000 && s.Method == SamplingMethod.Metropolis),
            "null, or 1 to 10^6 with the Metropolis method", s => s.SwapInterval?.ToString(C) ?? "null", (w, s) => WriteOptional(w, "swapInterval", s.SwapInterval),
            (s, e) => s with { SwapInterval = e is { ValueKind: JsonValueKind.Number } v ? v.GetInt32() : null }),
        OptionalInteger("MaxThreads", "maxThreads", v => v is >= 1 and <= 1024, "null or 1 to 1024", s => s.MaxThreads, (s, v) => s with { MaxThreads = v }),
        OptionalInteger("ChainsPerVector", "chainsPerVector", v => v is 1 or 2 or 4 or 8, "null, 1, 2, 4 or 8", s => s.ChainsPerVector, (s, v) => s with { ChainsPerVector = v }),
    ];

    /// <summary>The most scattering-vector values a run records (64 site vectors).</summary>
    internal const int MaxScatteringValues = 192;

    /// <summary>The largest scattering-vector component, Å⁻¹.</summary>
    internal const double MaxScatteringVector = SamplingSettings.MaxScatteringVectorInInverseAngstroms;

    /// <summary>The scattering vectors (empty for a default array).</summary>
    internal static ImmutableArray<double> Waves(SamplingSettings s) => s.ScatteringVectorsInInverseAngstroms.IsDefault ? [] : s.ScatteringVectorsInInverseAngstroms;

    /// <summary>"Name = value is out of range; valid: range." for every invalid field, in order.</summary>
    internal static IEnumerable<string> Problems(SamplingSettings s)
        => All.Where(f => !f.Valid(s)).Select(f => $"{f.Name} = {f.Text(s)} is out of range; valid: {f.Range}.");

    /// <summary>
    /// A sentence for every result-changing field in which <paramref name="saved"/> and <paramref name="run"/> differ: by
    /// default "its Name is a, and this run's is b."; <paramref name="sentence"/> (name, saved, run) words it otherwise.
    /// </summary>
    internal static IEnumerable<string> Differences(SamplingSettings saved, SamplingSettings run, Func<string, string, string, string>? sentence = null)
        => All.Where(f => f.ChangesResults && f.Text(saved) != f.Text(run))
            .Select(f => (sentence ?? ((n, a, b) => $"its {n} is {a}, and this run's is {b}."))(f.Name, f.Text(saved), f.Text(run)));

    /// <summary>Writes the settings as one JSON object.</summary>
    internal static void Write(Utf8JsonWriter w, SamplingSettings s)
    {
        w.WriteStartObject();
        foreach (var f in All)
        {
            f.Write(w, s);
        }
        w.WriteEndObject();
    }

    /// <summary>Reads what <see cref="Write"/> wrote and validates it.</summary>
    /// <param name="e">The settings object.</param>
    /// <param name="what">The file, for messages ("checkpoint", "record file").</param>
    internal static SamplingSettings Read(JsonElement e, string what)
    {
        var settings = new SamplingSettings { Seed = 0 };
        foreach (var f in All)
        {
            try
            {
                settings = f.Read(settings, e.TryGetProperty(f.JsonName, out var v) ? v : null);
            }
            catch (KeyNotFoundException)
            {
                throw new CheckpointException($"The {what}'s settings lack \"{f.JsonName}\".");
            }
            catch (FormatException) when (f.JsonName == "method")
            {
                throw new CheckpointException($"The {what}'s settings name an unknown method.");
            }
            // A number of the wrong kind (InvalidOperationException, FormatException) is left to the caller, which names the file's metadata.
        }
        try
        {
            settings.Validate();
        }
        catch (ArgumentException ex)
        {
            throw new CheckpointException($"The {what}'s settings are invalid: " + ex.Message, ex);
        }
        return settings;
    }

    private static JsonElement Required(JsonElement? e, string name)
        => e is { ValueKind: not JsonValueKind.Null } v ? v : throw new KeyNotFoundException($"\"{name}\" is missing.");

    private static SamplingMethod ReadMethod(JsonElement e)
        => e.ValueKind == JsonValueKind.String && Enum.TryParse<SamplingMethod>(e.GetString(), ignoreCase: false, out var m) && Enum.IsDefined(m)
            ? m : throw new FormatException("\"method\" names an unknown method.");

    private static Field Integer(string name, string json, bool changesResults, long lower, long upper, string range, Func<SamplingSettings, long> get,
        Func<SamplingSettings, long, SamplingSettings> with)
        => new(name, json, changesResults, s => get(s) >= lower && get(s) <= upper, range, s => get(s).ToString(C),
            (w, s) => w.WriteNumber(json, get(s)), (s, e) => with(s, Required(e, json).GetInt64()));

    private static Field OptionalInteger(string name, string json, Func<int, bool> valid, string range, Func<SamplingSettings, int?> get,
        Func<SamplingSettings, int?, SamplingSettings> with)
        => new(name, json, false, s => get(s) is not int v || valid(v), range, s => get(s)?.ToString(C) ?? "null",
            (w, s) => WriteOptional(w, json, get(s)), (s, e) => with(s, e is { ValueKind: JsonValueKind.Number } v ? v.GetInt32() : null));

    private static Field Real(string name, string json, Func<double, bool> valid, string range, Func<SamplingSettings, double?> get,
        Func<SamplingSettings, double?, SamplingSettings> with)
        => new(name, json, true, s => get(s) is not double v || valid(v), range, s => get(s)?.ToString("R", C) ?? "null",
            (w, s) => WriteOptional(w, json, get(s)), (s, e) => with(s, e is { ValueKind: JsonValueKind.Number } v ? v.GetDouble() : null));

    private static void WriteOptional(Utf8JsonWriter w, string name, double? value)
    {
        if (value is double v)
        {
            w.WriteNumber(name, v);
        }
        else
        {
            w.WriteNull(name);
        }
    }
}
