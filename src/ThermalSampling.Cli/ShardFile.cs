using System;
using System.Collections.Generic;
using System.Collections.Immutable;
using System.Globalization;
using System.IO;
using System.Linq;
using System.Security.Cryptography;
using System.Text;
using System.Text.Json;
using ThermalSampling.Persistence;
using ThermalSampling.Reports;
using ThermalSampling.Sampling;

namespace ThermalSampling.Cli;

/// <summary>
/// One part of a sharded sweep (<c>sweep SCENARIO --shard I/N --output FILE</c>), self-describing and checksummed: a JSON
/// document with <c>format</c> ("thermal-sampling-part"), <c>formatVersion</c>, <c>libraryVersion</c>, <c>shard</c>,
/// <c>shards</c>, <c>scenario</c> (the scenario file's text), <c>seed</c>, <c>temperatures</c> (as run), <c>records</c>
/// (per temperature the part has chains of: <c>temperature</c>, <c>firstChain</c>, <c>chains</c>, and <c>bytes</c>, the
/// record file of <see cref="TemperatureRecord.WriteTo"/> in base 64, itself checksummed) and <c>sha256</c> over
/// everything before it. <see cref="Merge"/> turns every part back into the one-process document.
/// </summary>
internal static class ShardFile
{
    internal const string FormatName = "thermal-sampling-part";
    internal const int FormatVersion = 1;

    /// <summary>Writes a part (through a temporary file, so a killed task leaves no half-written part).</summary>
    internal static void Write(string path, byte[] scenarioFile, Scenario scenario, int shard, int shards, IReadOnlyList<TemperatureRecord> records)
    {
        var body = new MemoryStream();
        using (var w = new Utf8JsonWriter(body))
        {
            w.WriteStartObject();
            w.WriteString("format", FormatName);
            w.WriteNumber("formatVersion", FormatVersion);
            w.WriteString("libraryVersion", Provenance.CurrentLibraryVersion);
            w.WriteNumber("shard", shard);
            w.WriteNumber("shards", shards);
            w.WriteString("scenario", Encoding.UTF8.GetString(scenarioFile));
            w.WriteNumber("seed", scenario.Sampling.Seed);
            w.WriteStartArray("temperatures");
            foreach (double t in scenario.TemperaturesInKelvin)
            {
                w.WriteNumberValue(t);
            }
            w.WriteEndArray();
            w.WriteStartArray("records");
            foreach (var r in records)
            {
                var bytes = new MemoryStream();
                r.WriteTo(bytes);
                w.WriteStartObject();
                w.WriteNumber("temperature", r.Temperature.InKelvin);
                w.WriteNumber("firstChain", r.Chains[0].Chain);
                w.WriteNumber("chains", r.Chains.Length);
                w.WriteBase64String("bytes", bytes.ToArray());
                w.WriteEndObject();
            }
            w.WriteEndArray();
        }
        // The checksum covers the document up to its closing brace: append it as the last key.
        var text = Encoding.UTF8.GetString(body.ToArray());
        string digest = Convert.ToHexString(SHA256.HashData(Encoding.UTF8.GetBytes(text)));
        string temp = path + ".tmp";
        File.WriteAllText(temp, text + ",\"sha256\":\"" + digest + "\"}\n", new UTF8Encoding(false));
        File.Move(temp, path, overwrite: true);
    }

    /// <summary>A part as read back, checked.</summary>
    private sealed record Part(string File, int Shard, int Shards, string Library, string Scenario, ulong Seed, double[] Temperatures, List<TemperatureRecord> Records);

    private static Part Read(string file)
    {
        string text;
        try
        {
            text = File.ReadAllText(file, Encoding.UTF8);
        }
        catch (Exception ex) when (ex is IOException or UnauthorizedAccessException)
        {
            throw new CheckpointException($"{file}: cannot be read ({ex.Message}).");
        }
        int at = text.LastIndexOf(",\"sha256\":\"", StringComparison.Ordinal);
        if (at < 0)
        {
            throw new CheckpointException($"{file}: not a part written by 'sweep --shard' (no checksum).");
        }
        string digest = Convert.ToHexString(SHA256.HashData(Encoding.UTF8.GetBytes(text[..at])));
        if (!text[(at + 11)..].StartsWith(digest + "\"}", StringComparison.Ordinal))
        {
            throw new CheckpointException($"{file}: the checksum does not match: the part is damaged or was edited.");
        }
        try
        {
            using var doc = JsonDocument.Parse(text);
            var root = doc.RootElement;
            if (root.GetProperty("format").GetString() != FormatName)
            {
                throw new CheckpointException($"{file}: not a part written by 'sweep --shard' (format '{root.GetProperty("format").GetString()}').");
            }
            int version = root.GetProperty("formatVersion").GetInt32();
            if (version != FormatVersion)
            {
                throw new CheckpointException($"{file}: part format version {version}; this tool reads version {FormatVersion}.");
            }
            var records = root.GetProperty("records").EnumerateArray()
                .Select(r => TemperatureRecord.ReadFrom(new MemoryStream(r.GetProperty("bytes").GetBytesFromBase64()))).ToList();
            return new Part(file, root.GetProperty("shard").GetInt32(), root.GetProperty("shards").GetInt32(), root.GetProperty("libraryVersion").GetString()!,
                root.GetProperty("scenario").GetString()!, root.GetProperty("seed").GetUInt64(),
                [.. root.GetProperty("temperatures").EnumerateArray().Select(t => t.GetDouble())], records);
        }
        catch (Exception ex) when (ex is JsonException or KeyNotFoundException or InvalidOperationException or FormatException)
        {
            throw new CheckpointException($"{file}: not a part written by 'sweep --shard' ({ex.Message}).");
        }
    }

    /// <summary>
    /// Reads every part, refuses (naming the files) parts of another scenario, seed, temperature list or library version,
    /// a shard given twice and missing shards (listing them), merges each temperature's records in chain order and
    /// summarises them into the document the one-process sweep writes.
    /// </summary>
    internal static ScenarioResults Merge(IReadOnlyList<string> files)
    {
        var parts = files.Select(Read).ToList();
        var first = parts[0];
        foreach (var p in parts.Skip(1))
        {
            string? differs = p.Library != first.Library ? $"library version {p.Library} against {first.Library}"
                : p.Scenario != first.Scenario ? "another scenario file"
                : p.Seed != first.Seed ? $"seed {p.Seed} against {first.Seed}"
                : !p.Temperatures.SequenceEqual(first.Temperatures) ? "another temperature list"
                : p.Shards != first.Shards ? $"{p.Shards} parts in all against {first.Shards}"
                : null;
            if (differs is not null)
            {
                throw new CheckpointException($"{p.File} and {first.File} are parts of different sweeps: {differs}.");
            }
        }
        if (first.Library != Provenance.CurrentLibraryVersion)
        {
            throw new CheckpointException($"{first.File}: written by library version {first.Library}; this tool is {Provenance.CurrentLibraryVersion}, and only the same version merges to the same bits.");
        }
        foreach (var twice in parts.GroupBy(p => p.Shard).Where(g => g.Count() > 1))
        {
            throw new CheckpointException(string.Create(CultureInfo.InvariantCulture, $"part {twice.Key} of {first.Shards} is given twice: {string.Join(" and ", twice.Select(p => p.File))}."));
        }
        var missing = Enumerable.Range(1, first.Shards).Except(parts.Select(p => p.Shard)).ToList();
        if (missing.Count > 0)
        {
            throw new CheckpointException(string.Create(CultureInfo.InvariantCulture,
                $"{missing.Count} of {first.Shards} parts are missing: {string.Join(", ", missing.Take(20))}{(missing.Count > 20 ? ", …" : "")}."));
        }
        var scenario = ScenarioReader.Read(Encoding.UTF8.GetBytes(first.Scenario));
        scenario = scenario with
        {
            TemperaturesInKelvin = [.. first.Temperatures],
            Sampling = scenario.Sampling with { Seed = first.Seed, RetainedDrawsPerChain = 0 },
        };
        var merged = first.Temperatures.Select(t => TemperatureRecord.Merge(parts.SelectMany(p => p.Records).Where(r => r.Temperature.InKelvin == t))).ToList();
        return ScenarioRunner.Summarise(scenario, merged);
    }
}
