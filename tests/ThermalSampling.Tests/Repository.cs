using System;
using System.IO;

namespace ThermalSampling.Tests;

/// <summary>The repository the tests run from: the folder that holds ThermalSampling.sln, above the test binaries.</summary>
internal static class Repository
{
    /// <summary>The repository's root folder.</summary>
    internal static string Root { get; } = Find();

    /// <summary>A path below the root, for example <c>Repository.File("docs", "cli.md")</c>.</summary>
    internal static string File(params string[] parts) => Path.Combine([Root, .. parts]);

    private static string Find()
    {
        string root = AppContext.BaseDirectory;
        while (!System.IO.File.Exists(Path.Combine(root, "ThermalSampling.sln")))
        {
            root = Path.GetDirectoryName(root) ?? throw new InvalidOperationException("solution root not found above " + AppContext.BaseDirectory);
        }
        return root;
    }
}
