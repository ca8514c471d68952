using System;
using System.IO;
using SharpFuzz;
using ThermalSampling.Cli;

namespace ThermalSampling.Fuzz;

/// <summary>
/// Fuzz target: any byte string given to the scenario reader must parse or be refused with a ScenarioException; any other
/// exception is a crash the fuzzer keeps. <c>replay DIR</c> runs every file of a folder once without the fuzzer (what
/// the regression test in tests/ThermalSampling.Tests does with tests/fuzz-findings).
/// </summary>
public static class Program
{
    public static int Main(string[] args)
    {
        if (args.Length == 2 && args[0] == "replay")
        {
            int failures = 0;
            foreach (var file in Directory.GetFiles(args[1]))
            {
                try
                {
                    Target(File.ReadAllBytes(file));
                }
#pragma warning disable CA1031 // a replay reports every crash, whatever its type
                catch (Exception ex)
#pragma warning restore CA1031
                {
                    failures++;
                    Console.Error.WriteLine($"{file}: {ex.GetType().Name}: {ex.Message}");
                }
            }
            Console.WriteLine($"{Directory.GetFiles(args[1]).Length} inputs replayed, {failures} crashed");
            return failures == 0 ? 0 : 1;
        }
        Fuzzer.OutOfProcess.Run(stream =>
        {
            using var copy = new MemoryStream();
            stream.CopyTo(copy);
            Target(copy.ToArray());
        });
        return 0;
    }

    /// <summary>Reads one input; a ScenarioException is the reader's documented refusal, not a crash.</summary>
    public static void Target(byte[] input)
    {
        try
        {
            ScenarioReader.Read(input);
        }
        catch (ScenarioException)
        {
        }
    }
}
