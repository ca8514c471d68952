using System;
using System.Collections.Generic;
using System.Globalization;
using System.IO;
using System.Linq;
using System.Threading;
using ThermalSampling.Sampling;

namespace ThermalSampling.Cli;

/// <summary>The <c>thermal-sampling</c> command. Exit codes: 0 success, 2 invalid input, 1 any other failure (including a cancelled run).</summary>
public static class Program
{
    /// <summary>Exit code for success.</summary>
    public const int Success = 0;

    /// <summary>Exit code for a failure that is not the input's fault, or a cancelled run.</summary>
    public const int Failure = 1;

    /// <summary>Exit code for invalid input (scenario or command line).</summary>
    public const int InvalidInput = 2;

    private const string Usage = """
        Usage:
          thermal-sampling demo     [--format F] [--figures DIR] [--threads N] [--quiet]
          thermal-sampling run      SCENARIO.json [--format F] [--output FILE] [--samples FILE.csv] [--plot FILE.png|svg] [--seed N] [--threads N] [--quiet]
          thermal-sampling sweep    SCENARIO.json --from K --to K --steps N [same options as run]
          thermal-sampling validate SCENARIO.json
          thermal-sampling --version | --help

        demo      Runs two built-in, invented scenarios (an adatom at an fcc(111) hollow site and the same atom on a line).
        run       Samples the scenario at every temperature and writes the vibration report.
        sweep     Like run, with the temperatures replaced by --steps values evenly spaced from --from to --to (K).
        validate  Checks a scenario file without running it; lists every problem with its JSON path.

        --format   table (default for demo), json (default for run and sweep), markdown or csv
        --output   write the report to FILE instead of standard output
        --samples  also write the raw draws (up to 1 000 000 per chain) to FILE.csv
        --plot     also draw figures: FILE-T<K>K.png per temperature (sites: -marginals and -projection), FILE-sweep.png
        --figures  where demo writes its figures (default: ./thermal-sampling-demo-figures)
        --seed     override sampling.seed from the file
        --threads  worker threads (results do not depend on it)
        --quiet    no progress output (progress goes to standard error: bars on a terminal, lines otherwise)
        """;

    private sealed record Options(string Command, string? File, string Format, string? Output, string? Samples, ulong? Seed, int? Threads, bool Quiet,
        double? From, double? To, int? Steps, string? Plot = null, string? Figures = null);

    /// <summary>Where <c>demo</c> writes its figures unless told otherwise.</summary>
    public const string DefaultDemoFigureFolder = "thermal-sampling-demo-figures";

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
        bool interactive = !Console.IsErrorRedirected;
        return Run(args, stdout, Console.Error, cts.Token, interactive);
    }

    /// <summary>Runs the command with explicit streams (used by tests and by <see cref="Main"/>).</summary>
    /// <param name="args">Command-line arguments.</param>
    /// <param name="stdout">Where the report goes.</param>
    /// <param name="stderr">Where messages and progress go.</param>
    /// <param name="cancellationToken">Stops a run; finished temperatures are still reported.</param>
    /// <param name="interactiveProgress">Whether to draw progress bars (a terminal) rather than lines.</param>
    public static int Run(string[] args, Stream stdout, TextWriter stderr, CancellationToken cancellationToken = default, bool interactiveProgress = false)
    {
        ArgumentNullException.ThrowIfNull(args);
        ArgumentNullException.ThrowIfNull(stdout);
        ArgumentNullException.ThrowIfNull(stderr);
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
        if (!TryParse(args, stderr, out var o))
        {
            return InvalidInput;
        }
        string file = o.File ?? "demo";
        try
        {
            if (o.Command == "demo")
            {
                var demo = DemoScenarios.All();
                string folder = Path.GetFullPath(o.Figures ?? DefaultDemoFigureFolder);
                int code = Success;
                for (int i = 0; i < demo.Length; i++)
                {
                    var withPlot = o with { Plot = Path.Combine(folder, DemoScenarios.FigureNames[i] + ".png") };
                    code = Math.Max(code, Execute(Configure(demo[i], withPlot), withPlot, stdout, stderr, interactiveProgress, cancellationToken));
                    if (code == Failure)
                    {
                        break;
                    }
                }
                stderr.WriteLine($"figures: {folder}");
                return code;
            }
            var loaded = Load(o.File!, stderr);
            if (loaded is null)
            {
                return InvalidInput;
            }
            if (o.Command == "validate")
            {
                stderr.WriteLine($"{o.File}: valid scenario ({loaded.TemperaturesInKelvin.Length} temperature(s), {loaded.Potential.Form} potential, {loaded.Landscape.Kind} landscape).");
                return Success;
            }
            if (o.Command == "sweep")
            {
                var temperatures = Enumerable.Range(0, o.Steps!.Value)
                    .Select(i => o.Steps == 1 ? o.From!.Value : o.From!.Value + (o.To!.Value - o.From.Value) * i / (o.Steps.Value - 1))
                    .ToArray();
                loaded = loaded with { TemperaturesInKelvin = System.Collections.Immutable.ImmutableArray.Create(temperatures) };
            }
            return Execute(Configure(loaded, o), o, stdout, stderr, interactiveProgress, cancellationToken);
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
        catch (Exception ex) when (ex is IOException or UnauthorizedAccessException or InvalidOperationException or ArithmeticException)
        {
            stderr.WriteLine($"error: {ex.Message}");
            return Failure;
        }
    }

    private static Scenario Configure(Scenario scenario, Options o)
    {
        var sampling = scenario.Sampling with
        {
            Seed = o.Seed ?? scenario.Sampling.Seed,
            MaxThreads = o.Threads,
            RetainedDrawsPerChain = o.Samples is not null ? (int)Math.Min(scenario.Sampling.SamplesPerChain, SamplesWriter.DrawsPerChain)
                : o.Plot is not null && scenario.Landscape.Kind == "sites" ? (int)Math.Min(scenario.Sampling.SamplesPerChain, 20_000) : 0,
        };
        return scenario with { Sampling = sampling };
    }

    private static Scenario? Load(string file, TextWriter stderr)
    {
        if (!File.Exists(file))
        {
            stderr.WriteLine($"error: scenario file '{file}' does not exist.");
            return null;
        }
        var info = new FileInfo(file);
        if (info.Length > ScenarioReader.MaximumBytes)
        {
            stderr.WriteLine($"error: {file}: $: the file is {info.Length} bytes; scenario files are limited to {ScenarioReader.MaximumBytes} bytes.");
            return null;
        }
        return ScenarioReader.Read(File.ReadAllBytes(file));
    }

    private static int Execute(Scenario scenario, Options o, Stream stdout, TextWriter stderr, bool interactive, CancellationToken ct)
    {
        ScenarioResults results;
        if (o.Quiet)
        {
            results = ScenarioRunner.Run(scenario, null, ct, o.Plot);
        }
        else if (interactive)
        {
            long steps = (scenario.Sampling.Method == SamplingMethod.Metropolis ? scenario.Sampling.BurnIn : 0) + scenario.Sampling.SamplesPerChain;
            results = InteractiveProgress.Run(scenario.Sampling.Chains, scenario.TemperaturesInKelvin.Length, steps, p => ScenarioRunner.Run(scenario, p, ct, o.Plot));
        }
        else
        {
            results = ScenarioRunner.Run(scenario, new LineProgress(stderr, scenario.Sampling.Chains), ct, o.Plot);
        }
        foreach (string figure in results.Figures ?? Array.Empty<string>())
        {
            if (!o.Quiet || o.Command != "demo")
            {
                stderr.WriteLine($"figure: {figure}");
            }
        }
        if (results.Cancelled)
        {
            stderr.WriteLine(string.Create(CultureInfo.InvariantCulture,
                $"cancelled: {results.Finished} of {scenario.TemperaturesInKelvin.Length} temperature(s) finished; the report below holds only those."));
        }
        if (o.Output is null)
        {
            Renderers.Write(results, o.Format, stdout);
            stdout.Flush();
        }
        else
        {
            string temp = o.Output + ".tmp";
            using (var f = File.Create(temp))
            {
                Renderers.Write(results, o.Format, f);
            }
            File.Move(temp, o.Output, overwrite: true);
        }
        if (o.Samples is not null)
        {
            SamplesWriter.Write(results, o.Samples);
        }
        return results.Cancelled ? Failure : Success;
    }

    private static bool TryParse(string[] args, TextWriter stderr, out Options options)
    {
        options = null!;
        string command = args[0];
        if (command is not ("run" or "sweep" or "validate" or "demo"))
        {
            stderr.WriteLine($"error: unknown command '{command}'. Commands: demo, run, sweep, validate.");
            stderr.WriteLine(Usage);
            return false;
        }
        string? file = null, output = null, samples = null, format = null, plot = null, figures = null;
        ulong? seed = null;
        int? threads = null, steps = null;
        double? from = null, to = null;
        bool quiet = false;
        var errors = new List<string>();
        for (int i = 1; i < args.Length; i++)
        {
            string a = args[i];
            string? Next() => i + 1 < args.Length ? args[++i] : null;
            switch (a)
            {
                case "--format":
                    format = Next();
                    if (format is null || !Renderers.Formats.Contains(format))
                    {
                        errors.Add($"--format '{format}' is not supported; choose one of: {string.Join(", ", Renderers.Formats)}.");
                    }
                    break;
                case "--output":
                    output = Next() ?? Missing(errors, a, "a file name");
                    break;
                case "--samples":
                    samples = Next() ?? Missing(errors, a, "a CSV file name");
                    break;
                case "--plot":
                    plot = Next();
                    if (plot is null || !FigureWriter.HasFigureExtension(plot))
                    {
                        errors.Add($"--plot needs a file name ending in .png or .svg, not '{plot}'.");
                    }
                    break;
                case "--figures":
                    figures = Next() ?? Missing(errors, a, "a folder name");
                    break;
                case "--quiet":
                    quiet = true;
                    break;
                case "--seed":
                    if (ulong.TryParse(Next(), NumberStyles.None, CultureInfo.InvariantCulture, out ulong s))
                    {
                        seed = s;
                    }
                    else
                    {
                        errors.Add("--seed needs a whole number from 0 to 18446744073709551615.");
                    }
                    break;
                case "--threads":
                    if (int.TryParse(Next(), NumberStyles.None, CultureInfo.InvariantCulture, out int t) && t is >= 1 and <= 1024)
                    {
                        threads = t;
                    }
                    else
                    {
                        errors.Add("--threads needs a whole number from 1 to 1024.");
                    }
                    break;
                case "--steps":
                    if (int.TryParse(Next(), NumberStyles.None, CultureInfo.InvariantCulture, out int n) && n is >= 1 and <= ScenarioReader.MaximumTemperatures)
                    {
                        steps = n;
                    }
                    else
                    {
                        errors.Add($"--steps needs a whole number from 1 to {ScenarioReader.MaximumTemperatures}.");
                    }
                    break;
                case "--from":
                case "--to":
                    if (double.TryParse(Next(), NumberStyles.Float, CultureInfo.InvariantCulture, out double k) && double.IsFinite(k) && k > 0 && k <= 1e7)
                    {
                        if (a == "--from")
                        {
                            from = k;
                        }
                        else
                        {
                            to = k;
                        }
                    }
                    else
                    {
                        errors.Add($"{a} needs a temperature in K, greater than 0 and at most 1e7.");
                    }
                    break;
                default:
                    if (a.StartsWith('-') || file is not null || command == "demo")
                    {
                        errors.Add($"unexpected argument '{a}'.");
                    }
                    else
                    {
                        file = a;
                    }
                    break;
            }
        }
        if (command != "demo" && file is null)
        {
            errors.Add($"{command} needs a scenario file: thermal-sampling {command} SCENARIO.json");
        }
        if (figures is not null && command != "demo")
        {
            errors.Add("--figures belongs to demo; use --plot with run and sweep.");
        }
        if (plot is not null && command == "demo")
        {
            errors.Add("demo always draws its figures; choose the folder with --figures.");
        }
        if (command == "sweep")
        {
            if (from is null || to is null || steps is null)
            {
                errors.Add("sweep needs --from K --to K --steps N.");
            }
            else if (steps > 1 && !(from < to))
            {
                errors.Add("sweep needs --from below --to.");
            }
        }
        else if (from is not null || to is not null || steps is not null)
        {
            errors.Add("--from, --to and --steps belong to sweep.");
        }
        foreach (string e in errors)
        {
            stderr.WriteLine("error: " + e);
        }
        if (errors.Count > 0)
        {
            return false;
        }
        options = new Options(command, file, format ?? (command == "demo" ? "table" : "json"), output, samples, seed, threads, quiet, from, to, steps, plot, figures);
        return true;
    }

    private static string? Missing(List<string> errors, string option, string what)
    {
        errors.Add($"{option} needs {what}.");
        return null;
    }
}
