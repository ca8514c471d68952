using System;
using System.IO;
using System.Text;
using System.Text.Json;
using System.Text.Json.Nodes;

namespace ThermalSampling.Cli;

/// <summary>
/// A scenario file with what it refers to brought inside: a structure landscape's <c>file</c> (a CIF or XYZ path, relative
/// to the scenario file) is read and replaced by its text (<c>cif</c> for a .cif file, else <c>xyz</c>), so that the echoed
/// input, a checkpoint and a shard carry everything and resume or merge anywhere.
/// </summary>
internal static class ScenarioFiles
{
    /// <summary>The scenario's bytes with a structure's <c>file</c> inlined; the bytes as they are when there is none (or when they are not a JSON object: the reader says what is wrong).</summary>
    internal static byte[] Resolved(string scenarioPath)
    {
        var bytes = File.ReadAllBytes(scenarioPath);
        JsonNode? root;
        try
        {
            root = JsonNode.Parse(bytes, documentOptions: new JsonDocumentOptions { CommentHandling = JsonCommentHandling.Skip, AllowTrailingCommas = true });
        }
        catch (JsonException)
        {
            return bytes;
        }
        if (root is not JsonObject document || document["landscape"] is not JsonObject landscape || landscape["file"] is not JsonValue fileValue
            || !fileValue.TryGetValue(out string? file))
        {
            return bytes;
        }
        string directory = Path.GetDirectoryName(Path.GetFullPath(scenarioPath)) ?? ".";
        string path = Path.GetFullPath(Path.Combine(directory, file));
        if (!File.Exists(path))
        {
            throw new ScenarioException(new[] { $"$.landscape.file: the structure file '{file}' does not exist (looked for {path})." });
        }
        if (landscape.ContainsKey("cif") || landscape.ContainsKey("xyz"))
        {
            throw new ScenarioException(new[] { "$.landscape: give the structure once: file, or cif or xyz text, not both." });
        }
        string key = path.EndsWith(".cif", StringComparison.OrdinalIgnoreCase) ? "cif" : "xyz";
        landscape.Remove("file");
        landscape[key] = File.ReadAllText(path, Encoding.UTF8);
        return Encoding.UTF8.GetBytes(document.ToJsonString(new JsonSerializerOptions { WriteIndented = true }));
    }
}
