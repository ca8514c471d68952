using System;
using System.IO;
using System.Text;
using ThermalSampling.Cli;

namespace ThermalSampling.Tests;

/// <summary>What the command-line tests share: running the command in process, and a scenario written to a fresh file.</summary>
internal static class CliHarness
{
    /// <summary>Runs the command with <paramref name="args"/> in this process; its exit code and what it printed to each stream.</summary>
    internal static (int Code, string Stdout, string Stderr) RunArgs(params string[] args)
    {
        using var stdout = new MemoryStream();
        using var stderr = new StringWriter();
        int code = Program.Run(args, stdout, stderr);
        return (code, Encoding.UTF8.GetString(stdout.ToArray()), stderr.ToString());
    }

    /// <summary>Writes <paramref name="json"/> to a new file in the temporary folder and returns its path.</summary>
    internal static string WriteScenario(string json)
    {
        string file = Path.Combine(Path.GetTempPath(), $"ts-{Guid.NewGuid():N}.json");
        File.WriteAllText(file, json);
        return file;
    }
}
