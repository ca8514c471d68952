using System;
using System.Collections.Generic;
using System.Globalization;
using System.IO;
using System.Linq;
using System.Text.Json;

namespace ThermalSampling.Cli;

/// <summary>A value's valid range as the scenario schema states it (a number's bounds; an array's length and its items' bounds).</summary>
/// <param name="Minimum">The smallest valid value (−∞ if none).</param>
/// <param name="Maximum">The largest valid value (+∞ if none).</param>
/// <param name="ExclusiveMinimum">Whether <paramref name="Minimum"/> itself is invalid.</param>
/// <param name="MinItems">An array's fewest entries.</param>
/// <param name="MaxItems">An array's most entries.</param>
internal sealed record Bounds(double Minimum, double Maximum, bool ExclusiveMinimum, int MinItems, int MaxItems);

/// <summary>
/// The scenario schema (docs/scenario.schema.json, built into the tool) as the one source of the reader's ranges: the
/// reader asks it for the bounds of every number, integer and array it reads, so the schema an editor checks a scenario
/// against and the reader that runs it cannot drift apart. Checks no schema can state (relations between values,
/// geometry) stay in the reader.
/// </summary>
internal static class ScenarioSchema
{
    private static readonly JsonDocument Document = Load();

    /// <summary>The schema's text.</summary>
    internal static string Text { get; } = Document.RootElement.GetRawText();

    private static JsonDocument Load()
    {
        using var stream = typeof(ScenarioSchema).Assembly.GetManifestResourceStream("scenario.schema.json")
            ?? throw new InvalidOperationException("The scenario schema is not built into the tool.");
        return JsonDocument.Parse(stream);
    }

    /// <summary>
    /// The bounds at <paramref name="path"/>: '/'-separated keys from the root, where a key <c>oneOf[a=b,c]</c> picks the
    /// branch whose property a is (or may be) b and that has a property c; <c>$ref</c>s are followed; <c>items</c>
    /// steps into an array's item schema. An array's bounds combine its length with its items' range.
    /// </summary>
    internal static Bounds At(string path)
    {
        var node = Resolve(Document.RootElement);
        foreach (string key in path.Split('/', StringSplitOptions.RemoveEmptyEntries))
        {
            node = Resolve(key.StartsWith("oneOf[", StringComparison.Ordinal) ? Branch(node, key) : Child(node, key, path));
        }
        int minItems = node.TryGetProperty("minItems", out var a) ? a.GetInt32() : 0;
        int maxItems = node.TryGetProperty("maxItems", out var b) ? b.GetInt32() : int.MaxValue;
        var number = node.TryGetProperty("items", out var items) ? Resolve(items) : node;
        double min = double.NegativeInfinity, max = double.PositiveInfinity;
        bool exclusive = false;
        if (number.TryGetProperty("minimum", out var lo))
        {
            min = lo.GetDouble();
        }
        if (number.TryGetProperty("exclusiveMinimum", out var elo))
        {
            (min, exclusive) = (elo.GetDouble(), true);
        }
        if (number.TryGetProperty("maximum", out var hi))
        {
            max = hi.GetDouble();
        }
        return new Bounds(min, max, exclusive, minItems, maxItems);
    }

    /// <summary>The enumerated values at <paramref name="path"/> (an <c>enum</c>), in the schema's order.</summary>
    internal static string[] Choices(string path)
    {
        var node = Resolve(Document.RootElement);
        foreach (string key in path.Split('/', StringSplitOptions.RemoveEmptyEntries))
        {
            node = Resolve(key.StartsWith("oneOf[", StringComparison.Ordinal) ? Branch(node, key) : Child(node, key, path));
        }
        return node.GetProperty("enum").EnumerateArray().Select(e => e.GetString()!).ToArray();
    }

    private static JsonElement Child(JsonElement node, string key, string path)
        => node.TryGetProperty(key, out var child) ? child : throw new InvalidOperationException($"The scenario schema has nothing at '{key}' of '{path}'.");

    private static JsonElement Branch(JsonElement node, string key)
    {
        var conditions = key["oneOf[".Length..^1].Split(',');
        foreach (var branch in node.GetProperty("oneOf").EnumerateArray().Select(Resolve))
        {
            if (!branch.TryGetProperty("properties", out var properties))
            {
                continue;
            }
            bool matches = conditions.All(condition =>
            {
                var parts = condition.Split('=');
                if (!properties.TryGetProperty(parts[0], out var property))
                {
                    return false;
                }
                if (parts.Length == 1)
                {
                    return true;
                }
                return (property.TryGetProperty("const", out var constant) && constant.GetString() == parts[1])
                    || (property.TryGetProperty("enum", out var choices) && choices.EnumerateArray().Any(e => e.GetString() == parts[1]));
            });
            if (matches)
            {
                return branch;
            }
        }
        throw new InvalidOperationException($"The scenario schema has no branch {key}.");
    }

    private static JsonElement Resolve(JsonElement node)
    {
        while (node.ValueKind == JsonValueKind.Object && node.TryGetProperty("$ref", out var reference))
        {
            node = Document.RootElement;
            foreach (string key in reference.GetString()!.TrimStart('#').Split('/', StringSplitOptions.RemoveEmptyEntries))
            {
                node = node.GetProperty(key);
            }
        }
        return node;
    }
}
