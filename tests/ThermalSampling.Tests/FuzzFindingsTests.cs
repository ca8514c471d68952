using System;
using System.Collections.Generic;
using System.IO;
using System.Linq;
using ThermalSampling.Cli;
using Xunit;

namespace ThermalSampling.Tests;

/// <summary>
/// Replays the inputs the AFL++ fuzzer (eng/fuzz-scenarios.sh) keeps: everything in tests/fuzz-findings and the example
/// scenarios must parse or be refused with a <see cref="ScenarioException"/>, never another exception. The same target
/// runs under the fuzzer (tests/ThermalSampling.Fuzz).
/// </summary>
public sealed class FuzzFindingsTests
{
    private static string RepositoryRoot() => Repository.Root;

    public static IEnumerable<object[]> Inputs()
    {
        string root = RepositoryRoot();
        return Directory.GetFiles(Path.Combine(root, "tests", "fuzz-findings"))
            .Where(f => !f.EndsWith("README.md", StringComparison.Ordinal))
            .Concat(Directory.GetFiles(Path.Combine(root, "docs", "examples", "scenarios"), "*.json"))
            .Select(f => new object[] { Path.GetRelativePath(root, f) });
    }

    [Theory]
    [MemberData(nameof(Inputs))]
    public void AKeptInputParsesOrIsRefusedWithAScenarioError(string relativePath)
    {
        var bytes = File.ReadAllBytes(Path.Combine(RepositoryRoot(), relativePath));
        try
        {
            var scenario = ScenarioReader.Read(bytes);
            Assert.NotNull(scenario);
        }
        catch (ScenarioException ex)
        {
            Assert.NotEmpty(ex.Message);
        }
    }
}
