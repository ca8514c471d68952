using System;
using System.Globalization;
using System.IO;
using System.Threading;

namespace ThermalSampling.Cli;

/// <summary>The <c>thermal-sampling</c> command. Exit codes: 0 success, 2 invalid input, 1 any other failure.</summary>
public static class Program
{
    /// <summary>Exit code for success.</summary>
    public const int Success = 0;

    /// <summary>Exit code for a failure that is not the input's fault.</summary>
    public const int Failure = 1;

    /// <summary>Exit code for invalid input (scenario or command line).</summary>
    public const int InvalidInput = 2;

    private const string Usage = """
        Usage:
          thermal-sampling run SCENARIO.json [--format json] [--output FILE] [--seed N] [--threads N]
          thermal-sampling --version
          thermal-sampling --help

        run      Samples the scenario at every temperature and writes the vibration report.
                 --format   json (the stable contract; default)
                 --output   write the report to FILE instead of standard output
                 --seed     override sampling.seed from the file
                 --threads  worker threads (results do not depend on it)
        """;

    /// <summary>Entry point.</summary>
    /// <param name="args">Command-line arguments.</param>
    public static int Main(string[] args)
    {
        using var cts = new CancellationTokenSource();
        Console.CancelKeyPress += (_, e) =>
        {
            e.Cancel = true;
            cts.Cancel();
        };
        using var stdout = Console.OpenStandardOutput();
        return Run(args, stdout, Console.Error, cts.Token);
    }

    /// <summary>Runs the command with explicit streams (used by tests and by <see cref="Main"/>).</summary>
    /// <param name="args">Command-line arguments.</param>
    /// <param name="stdout">Where the report goes.</param>
    /// <param name="stderr">Where messages go.</param>
    /// <param name="cancellationToken">Stops a run.</param>
    public static int Run(string[] args, Stream stdout, TextWriter stderr, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(args);
        CultureInfo.CurrentCulture = CultureInfo.InvariantCulture;
        if (args.Length == 0 || args[0] is "--help" or "-h" or "help")
        {
            stderr.WriteLine(Usage);
            return args.Length == 0 ? InvalidInput : Success;
        }
        if (args[0] == "--version")
        {
            using var writer = new StreamWriter(stdout, leaveOpen: true);
            writer.WriteLine(Reports.Provenance.CurrentLibraryVersion);
            return Success;
        }
        if (args[0] != "run")
        {
            stderr.WriteLine($"error: unknown command '{args[0]}'. Commands: run.");
            stderr.WriteLine(Usage);
            return InvalidInput;
        }
        string? file = null, format = "json", output = null;
        ulong? seed = null;
        int? threads = null;
        for (int i = 1; i < args.Length; i++)
        {
            string a = args[i];
            string? Next()
            {
                if (i + 1 >= args.Length)
                {
                    return null;
                }
                return args[++i];
            }
            switch (a)
            {
                case "--format":
                    format = Next();
                    if (format != "json")
                    {
                        stderr.WriteLine($"error: --format '{format}' is not supported; use json.");
                        return InvalidInput;
                    }
                    break;
                case "--output":
                    output = Next();
                    if (output is null)
                    {
                        stderr.WriteLine("error: --output needs a file name.");
                        return InvalidInput;
                    }
                    break;
                case "--seed":
                    if (!ulong.TryParse(Next(), NumberStyles.None, CultureInfo.InvariantCulture, out ulong s))
                    {
                        stderr.WriteLine("error: --seed needs a whole number from 0 to 18446744073709551615.");
                        return InvalidInput;
                    }
                    seed = s;
                    break;
                case "--threads":
                    if (!int.TryParse(Next(), NumberStyles.None, CultureInfo.InvariantCulture, out int t) || t < 1 || t > 1024)
                    {
                        stderr.WriteLine("error: --threads needs a whole number from 1 to 1024.");
                        return InvalidInput;
                    }
                    threads = t;
                    break;
                default:
                    if (a.StartsWith('-') || file is not null)
                    {
                        stderr.WriteLine($"error: unexpected argument '{a}'.");
                        return InvalidInput;
                    }
                    file = a;
                    break;
            }
        }
        if (file is null)
        {
            stderr.WriteLine("error: run needs a scenario file: thermal-sampling run SCENARIO.json");
            return InvalidInput;
        }
        try
        {
            if (!File.Exists(file))
            {
                stderr.WriteLine($"error: scenario file '{file}' does not exist.");
                return InvalidInput;
            }
            var info = new FileInfo(file);
            if (info.Length > ScenarioReader.MaximumBytes)
            {
                stderr.WriteLine($"error: {file}: $: the file is {info.Length} bytes; scenario files are limited to {ScenarioReader.MaximumBytes} bytes.");
                return InvalidInput;
            }
            var scenario = ScenarioReader.Read(File.ReadAllBytes(file));
            var sampling = scenario.Sampling with { Seed = seed ?? scenario.Sampling.Seed, MaxThreads = threads };
            scenario = scenario with { Sampling = sampling };
            var results = ScenarioRunner.Run(scenario, null, cancellationToken);
            if (output is null)
            {
                ReportJsonWriter.Write(results, stdout);
                stdout.WriteByte((byte)'\n');
                stdout.Flush();
            }
            else
            {
                string temp = output + ".tmp";
                using (var f = File.Create(temp))
                {
                    ReportJsonWriter.Write(results, f);
                    f.WriteByte((byte)'\n');
                }
                File.Move(temp, output, overwrite: true);
            }
            return Success;
        }
        catch (ScenarioException ex)
        {
            stderr.WriteLine($"error: {file}: invalid scenario");
            foreach (string p in ex.Problems)
            {
                stderr.WriteLine("  " + p);
            }
            return InvalidInput;
        }
        catch (OperationCanceledException)
        {
            stderr.WriteLine("cancelled: no report was written.");
            return Failure;
        }
        catch (Exception ex) when (ex is IOException or UnauthorizedAccessException or InvalidOperationException or ArithmeticException)
        {
            stderr.WriteLine($"error: {ex.Message}");
            return Failure;
        }
    }
}
