using System;
using System.Collections.Generic;
using System.IO;
using System.Linq;
using System.Text;
using System.Text.Json;
using Json.Schema;
using ThermalSampling.Cli;
using ThermalSampling.Sampling;
using Xunit;

namespace ThermalSampling.Tests;

/// <summary>
/// docs/scenario.schema.json against the scenario reader (JsonSchema.Net 8.0.5, MIT): every example and built-in scenario
/// is valid; every hostile case the schema can express is refused by both; valid edge cases (every range at its ends)
/// are accepted by both. What only the reader can check (the order of a window's bounds, coincident sites, a table's
/// monotone distances, a spurious Buckingham minimum, the physics of the landscape) is listed here by its message, so
/// nothing else may differ.
/// </summary>
public class SchemaTests
{
    private static readonly string Root = Repository.Root;

    private static readonly JsonSchema Schema = JsonSchema.FromText(File.ReadAllText(Path.Combine(Root, "docs", "scenario.schema.json")));

    /// <summary>Messages of checks no JSON Schema can state (relations between values, geometry, physics).</summary>
    private static readonly string[] BeyondSchema =
    [
        "$.landscape.window", // lower below upper; the minimum inside it
        "not both", "on top of each other", "coincides with the centre", "$.potential.r[2]", "$.potential.energy", "$.potential",
        "not kg", "in atomic mass units", // the schema refuses these too (0.5 to 1000 u); listed for the reader's own wording
        "$.temperatures", // each temperature once (uniqueItems is stated, but 40 and 40.0 are the same number only to the reader)
    ];

    private static bool SchemaAccepts(string json)
    {
        using var doc = JsonDocument.Parse(json);
        try
        {
            return Schema.Evaluate(doc.RootElement, new EvaluationOptions { OutputFormat = OutputFormat.Flag }).IsValid;
        }
        catch (Exception ex) when (ex is OverflowException or FormatException)
        {
            return false; // a number beyond the evaluator's decimal range (1e300) is beyond every maximum the schema states
        }
    }

    private static bool ReaderAccepts(string json)
    {
        try
        {
            ScenarioReader.Read(Encoding.UTF8.GetBytes(json));
            return true;
        }
        catch (ScenarioException)
        {
            return false;
        }
    }

    public static TheoryData<string> Examples()
    {
        var data = new TheoryData<string>();
        foreach (string file in Directory.GetFiles(Path.Combine(Root, "docs", "examples", "scenarios"), "*.json").Order())
        {
            data.Add(System.Text.Encoding.UTF8.GetString(ScenarioFiles.Resolved(file))); // a structure file inlined, as the command loads it
        }
        data.Add(DemoScenarios.LinePair);
        data.Add(DemoScenarios.SurfaceHollow);
        data.Add(HostileInputTests.Base);
        data.Add(HostileInputTests.Sites);
        return data;
    }

    [Theory]
    [MemberData(nameof(Examples))]
    public void Every_example_and_built_in_scenario_is_valid_for_both(string json)
    {
        Assert.True(SchemaAccepts(json), json);
        Assert.True(ReaderAccepts(json), json);
    }

    [Theory]
    [MemberData(nameof(HostileInputTests.Mutations), MemberType = typeof(HostileInputTests))]
    public void Hostile_cases_are_refused_by_the_schema_unless_only_the_reader_can_tell(string which, string find, string replace, string expected)
    {
        string json = (which == "sites" ? HostileInputTests.Sites : HostileInputTests.Base).Replace(find, replace, StringComparison.Ordinal);
        bool parses;
        try
        {
            using var _ = JsonDocument.Parse(json);
            parses = true;
        }
        catch (JsonException)
        {
            parses = false; // NaN, Infinity: not JSON at all, refused by the reader's parser with the line number
        }
        if (!parses)
        {
            Assert.False(ReaderAccepts(json));
            return;
        }
        bool schema = SchemaAccepts(json);
        if (schema)
        {
            Assert.True(BeyondSchema.Contains(expected),
                $"the schema accepts what the reader refuses with '{expected}': state the range in docs/scenario.schema.json");
        }
    }

    public static TheoryData<string, string> Edges => new()
    {
        { "\"seed\": 7", "\"seed\": 0" },
        { "\"seed\": 7", "\"seed\": 18446744073709551615" },
        { "\"chains\": 2", "\"chains\": 1" },
        { "\"chains\": 2", "\"chains\": 1024" },
        { "\"samplesPerChain\": 1000", "\"samplesPerChain\": 10" },
        { "\"burnIn\": 100", "\"burnIn\": 0" },
        { "\"temperatures\": [10, 40]", "\"temperatures\": [10000000]" },
        { "\"mass\": 39.9", "\"mass\": 0.5" },
        { "\"mass\": 39.9", "\"mass\": 1000" },
        { "\"seed\": 7 }", "\"seed\": 7, \"method\": \"direct\" }" },
        { "\"mass\": 39.9,", "\"title\": \"edge\", \"units\": { \"energy\": \"meV\", \"length\": \"nm\" }, \"mass\": 39.9," },
        { "\"mass\": 39.9,", "\"output\": { \"bins\": 4 }, \"mass\": 39.9," },
        { "\"mass\": 39.9,", "\"output\": { \"bins\": 10000 }, \"mass\": 39.9," },
    };

    [Theory]
    [MemberData(nameof(Edges))]
    public void Valid_edges_are_accepted_by_both(string find, string replace)
    {
        string json = HostileInputTests.Base.Replace(find, replace, StringComparison.Ordinal);
        Assert.NotEqual(HostileInputTests.Base, json);
        Assert.True(ReaderAccepts(json), "reader refuses " + replace);
        Assert.True(SchemaAccepts(json), "schema refuses " + replace);
    }

    public static TheoryData<string, string> OutOfRange => new()
    {
        { "\"seed\": 7", "\"seed\": 18446744073709551616" },
        { "\"chains\": 2", "\"chains\": 0" },
        { "\"mass\": 39.9", "\"mass\": 0.49" },
        { "\"mass\": 39.9", "\"mass\": 1000.5" },
        { "\"chains\": 2", "\"chains\": 1025" },
        { "\"samplesPerChain\": 1000", "\"samplesPerChain\": 9" },
        { "\"temperatures\": [10, 40]", "\"temperatures\": [10000001]" },
        { "\"seed\": 7 }", "\"seed\": 7, \"method\": \"gibbs\" }" },
        { "\"mass\": 39.9,", "\"units\": { \"energy\": \"Ry\" }, \"mass\": 39.9," },
        { "\"mass\": 39.9,", "\"output\": { \"bins\": 3 }, \"mass\": 39.9," },
        { "\"mass\": 39.9,", "\"output\": { \"bins\": 10001 }, \"mass\": 39.9," },
        { "\"mass\": 39.9,", "\"output\": { \"binz\": 10 }, \"mass\": 39.9," },
    };

    [Theory]
    [MemberData(nameof(OutOfRange))]
    public void Values_just_out_of_range_are_refused_by_both(string find, string replace)
    {
        string json = HostileInputTests.Base.Replace(find, replace, StringComparison.Ordinal);
        Assert.NotEqual(HostileInputTests.Base, json);
        Assert.False(ReaderAccepts(json), "reader accepts " + replace);
        Assert.False(SchemaAccepts(json), "schema accepts " + replace);
    }

    /// <summary>
    /// The library's own settings check (SamplingSettings.Validate) accepts exactly the schema's range of every sampling
    /// key a scenario can set: the bounds are valid, one step beyond them is not.
    /// </summary>
    [Theory]
    [InlineData("chains")]
    [InlineData("samplesPerChain")]
    [InlineData("burnIn")]
    public void The_library_and_the_schema_agree_on_every_sampling_range(string key)
    {
        var b = ScenarioSchema.At("properties/sampling/properties/" + key);
        SamplingSettings With(long v) => key switch
        {
            "chains" => new SamplingSettings { Seed = 1, Chains = (int)v },
            "samplesPerChain" => new SamplingSettings { Seed = 1, SamplesPerChain = v },
            _ => new SamplingSettings { Seed = 1, BurnIn = v },
        };
        With((long)b.Minimum).Validate();
        With((long)b.Maximum).Validate();
        Assert.Throws<ArgumentException>(() => With((long)b.Minimum - 1).Validate());
        Assert.Throws<ArgumentException>(() => With((long)b.Maximum + 1).Validate());
        var seed = ScenarioSchema.At("properties/sampling/properties/seed");
        Assert.Equal((0.0, (double)ulong.MaxValue), (seed.Minimum, seed.Maximum)); // SamplingSettings.Seed is a ulong: every value is valid
    }
}
