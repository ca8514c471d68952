using System;
using System.Collections.Generic;
using System.Globalization;
using System.IO;
using System.Linq;
using System.Threading;
using ThermalSampling.Persistence;
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

    internal sealed record Options(string Command, string? File, string Format, string? Output, string? Samples, ulong? Seed, int? Threads, bool Quiet,
        double? From, double? To, int? Count, string? Plot = null, string? Figures = null, string? Checkpoint = null, TimeSpan? CheckpointEvery = null,
        bool FormatGiven = false, (int Index, int Count)? Shard = null, string[]? Parts = null, (double From, double To, int Count)? ReweightTo = null);

    /// <summary>How often a checkpoint is written when --checkpoint-every is not given.</summary>
    private static readonly TimeSpan DefaultCheckpointInterval = TimeSpan.FromSeconds(60);

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
        using var output = new StreamWriter(stdout, new System.Text.UTF8Encoding(false), leaveOpen: true) { AutoFlush = true };
        Options? parsed = null;
        var root = CommandLine.Build(o => parsed = o);
        var result = root.Parse(args);
        if (result.Errors.Count > 0 && result.Action is not { ClearsParseErrors: true })
        {
            foreach (var error in result.Errors)
            {
                stderr.WriteLine("error: " + error.Message);
            }
            string command = result.CommandResult.Command.Name;
            stderr.WriteLine(command == root.Name ? "Run 'thermal-sampling --help' for the commands." : $"Run 'thermal-sampling {command} --help' for its options.");
            return InvalidInput;
        }
        int early = result.Invoke(new System.CommandLine.InvocationConfiguration { Output = output, Error = stderr });
        if (parsed is null)
        {
            return early; // help, version, or no command (usage on standard error, exit 2)
        }
        var o = parsed;
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
            if (o.Command == "resume")
            {
                return Resume(o, stdout, stderr, interactiveProgress, cancellationToken);
            }
            if (o.Command == "merge")
            {
                file = string.Join(", ", o.Parts!);
                var merged = ShardFile.Merge(o.Parts!);
                return Write(merged, o, stdout);
            }
            var loaded = Load(o.File!, stderr);
            if (loaded is null)
            {
                return InvalidInput;
            }
            if (o.Command == "validate")
            {
                // Everything run does short of sampling: the landscape is built, the minimum found and checked, the window
                // and confinement checked; the same errors, and the same warnings that need no draws.
                var checks = ScenarioRunner.Check(loaded).Checks!;
                stderr.WriteLine($"{o.File}: valid scenario ({loaded.TemperaturesInKelvin.Length} temperature(s), {loaded.Potential.Form} potential, {loaded.Landscape.Kind} landscape); {(checks.Count == 0 ? "no warnings before sampling." : $"{checks.Count} warning(s) before sampling:")}");
                foreach (string pair in ScenarioRunner.PairSummary(loaded.Landscape))
                {
                    stderr.WriteLine($"pair {pair}");
                }
                foreach (var (kelvin, warning) in checks)
                {
                    stderr.WriteLine(string.Create(CultureInfo.InvariantCulture, $"warning at {kelvin:G6} K [{warning.Code}]: {UnitText.InUnits(warning.Message, loaded.EnergyUnit, loaded.LengthUnit)}"));
                }
                return Success;
            }
            loaded = WithSweepTemperatures(loaded, o);
            if (o.Shard is { } part)
            {
                var configured = Configure(loaded, o);
                var records = ScenarioRunner.RunShard(configured, part.Index, part.Count, o.Quiet ? null : new LineProgress(stderr, configured.Sampling.Chains, configured.TemperaturesInKelvin.Length), cancellationToken);
                ShardFile.Write(o.Output!, ScenarioFiles.Resolved(o.File!), configured, part.Index, part.Count, records);
                if (!o.Quiet)
                {
                    stderr.WriteLine(string.Create(CultureInfo.InvariantCulture, $"part {part.Index} of {part.Count}: {records.Sum(r => r.Chains.Length)} chain(s) over {records.Count} temperature(s) written to {o.Output}"));
                }
                return Success;
            }
            CheckpointPlan? plan = null;
            if (o.Checkpoint is not null)
            {
                string path = o.Checkpoint;
                var options = new CheckpointOptions(o.CheckpointEvery ?? DefaultCheckpointInterval, c => c.WriteToFile(path))
                {
                    ApplicationData = RunRecord.Write(o, ScenarioFiles.Resolved(o.File!)),
                };
                plan = new CheckpointPlan(options, null);
            }
            return Execute(Configure(loaded, o), o, stdout, stderr, interactiveProgress, cancellationToken, plan);
        }
        catch (CheckpointException ex)
        {
            stderr.WriteLine($"error: {file}: {ex.Message}");
            return InvalidInput;
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

    private static Scenario WithSweepTemperatures(Scenario scenario, Options o)
    {
        if (o.ReweightTo is { } reweight)
        {
            if (scenario.Quantum)
            {
                throw new ScenarioException(new[] { "--reweight-to: reweighting across temperatures applies to classical statistics; this scenario asks for quantum statistics." });
            }
            scenario = scenario with { ReweightTo = reweight };
        }
        if (o.Command != "sweep" || o.Count is null)
        {
            return scenario; // a sweep without --from, --to and --count runs the scenario's own temperatures
        }
        var temperatures = Enumerable.Range(0, o.Count!.Value)
            .Select(i => o.Count == 1 ? o.From!.Value : o.From!.Value + (o.To!.Value - o.From.Value) * i / (o.Count.Value - 1))
            .ToArray();
        return scenario with { TemperaturesInKelvin = System.Collections.Immutable.ImmutableArray.Create(temperatures) };
    }

    /// <summary>
    /// <c>resume</c>: the run's own options and scenario come from the checkpoint; output options given now replace the
    /// stored ones, and anything that changes the computation (seed, retained draws) stays as it was.
    /// </summary>
    private static int Resume(Options given, Stream stdout, TextWriter stderr, bool interactive, CancellationToken ct)
    {
        var checkpoint = SamplingCheckpoint.ReadFromFile(given.File!);
        if (!RunRecord.TryRead(checkpoint.ApplicationData, out var original, out var scenarioBytes))
        {
            stderr.WriteLine($"error: {given.File}: this checkpoint was not written by 'thermal-sampling run' or 'sweep' (it carries no scenario); resume it from the library with PairSampler.Resume or SiteSampler.Resume.");
            return InvalidInput;
        }
        var scenario = WithSweepTemperatures(ScenarioReader.Read(scenarioBytes), original);
        var computed = Configure(scenario, original with { Threads = given.Threads ?? original.Threads });
        if (given.Samples is not null && computed.Sampling.RetainedDrawsPerChain == 0)
        {
            stderr.WriteLine($"error: --samples: the run was started without --samples, so its raw draws were not kept; they cannot be written now.");
            return InvalidInput;
        }
        var o = original with
        {
            Command = original.Command,
            Format = given.FormatGiven ? given.Format : original.Format,
            Output = given.Output ?? original.Output,
            Samples = given.Samples ?? original.Samples,
            Plot = given.Plot ?? original.Plot,
            Quiet = given.Quiet || original.Quiet,
            Threads = given.Threads ?? original.Threads,
            CheckpointEvery = given.CheckpointEvery ?? original.CheckpointEvery,
        };
        string path = Path.GetFullPath(given.File!);
        var options = new CheckpointOptions(o.CheckpointEvery ?? DefaultCheckpointInterval, c => c.WriteToFile(path)) { ApplicationData = checkpoint.ApplicationData };
        if (!o.Quiet)
        {
            stderr.WriteLine(string.Create(CultureInfo.InvariantCulture,
                $"resuming: {checkpoint.ChainStepsDone} of {checkpoint.ChainStepsTotal} chain steps done, {checkpoint.FinishedTemperatures} of {checkpoint.Temperatures.Length} temperature(s) finished."));
        }
        return Execute(computed, o with { Checkpoint = path }, stdout, stderr, interactive, ct, new CheckpointPlan(options, checkpoint));
    }

    private static Scenario Configure(Scenario scenario, Options o)
    {
        var sampling = scenario.Sampling with
        {
            Seed = o.Seed ?? scenario.Sampling.Seed,
            MaxThreads = o.Threads,
            RetainedDrawsPerChain = o.Samples is not null ? (int)Math.Min(scenario.Sampling.SamplesPerChain, SamplesWriter.DrawsPerChain) : 0,
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
        return ScenarioReader.Read(ScenarioFiles.Resolved(file));
    }

    /// <summary>
    /// A rough time for the planned run: chain-steps × a per-step cost (10 ns for a pair, 40 ns for a site, from
    /// docs/performance.md rounded up) over the threads that can share the work; only a guide, printed before a long run.
    /// </summary>
    internal static double EstimatedSeconds(Scenario scenario)
    {
        var o = scenario.Sampling;
        double steps = (double)o.Chains * ((o.Method == SamplingMethod.Metropolis ? o.BurnIn : 0) + o.SamplesPerChain) * scenario.TemperaturesInKelvin.Length;
        double perStep = scenario.Landscape.Kind == "sites" ? 40e-9 : 10e-9;
        int threads = Math.Max(1, Math.Min(o.MaxThreads ?? Environment.ProcessorCount, o.Chains));
        return steps * perStep / threads;
    }

    /// <summary>A duration as people say it: "40 s", "12 min", "3.5 h".</summary>
    internal static string Duration(double seconds) => seconds switch
    {
        < 90 => string.Create(CultureInfo.InvariantCulture, $"{seconds:F0} s"),
        < 5400 => string.Create(CultureInfo.InvariantCulture, $"{seconds / 60:F0} min"),
        _ => string.Create(CultureInfo.InvariantCulture, $"{seconds / 3600:F1} h"),
    };

    private static int Execute(Scenario scenario, Options o, Stream stdout, TextWriter stderr, bool interactive, CancellationToken ct, CheckpointPlan? plan = null)
    {
        double estimate = EstimatedSeconds(scenario);
        if (!o.Quiet && estimate >= 60)
        {
            stderr.WriteLine($"planned: {scenario.Sampling.Chains} chains × {scenario.TemperaturesInKelvin.Length} temperature(s); estimated time about {Duration(estimate)} on this machine (a rough guide; progress below refines it){(plan is null ? "; consider --checkpoint FILE" : "")}.");
        }
        ScenarioResults results;
        if (o.Quiet)
        {
            results = ScenarioRunner.Run(scenario, null, ct, o.Plot, plan);
        }
        else if (interactive)
        {
            long steps = (scenario.Sampling.Method == SamplingMethod.Metropolis ? scenario.Sampling.BurnIn : 0) + scenario.Sampling.SamplesPerChain;
            results = InteractiveProgress.Run(scenario.Sampling.Chains, scenario.TemperaturesInKelvin.Length, steps, p => ScenarioRunner.Run(scenario, p, ct, o.Plot, plan));
        }
        else
        {
            results = ScenarioRunner.Run(scenario, new LineProgress(stderr, scenario.Sampling.Chains, scenario.TemperaturesInKelvin.Length), ct, o.Plot, plan);
        }
        if (results.Cancelled && plan is not null)
        {
            stderr.WriteLine($"cancelled: the run's state is saved in {o.Checkpoint}; finish it with: thermal-sampling resume {o.Checkpoint}");
            return Failure;
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
        Write(results, o, stdout);
        if (o.Samples is not null)
        {
            SamplesWriter.Write(results, o.Samples);
        }
        return results.Cancelled ? Failure : Success;
    }

    /// <summary>Writes the document in the chosen format to --output (through a temporary file) or standard output.</summary>
    private static int Write(ScenarioResults results, Options o, Stream stdout)
    {
        if (o.Output is null)
        {
            Renderers.Write(results, o.Format, stdout, Renderers.OutputWidth());
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
        return Success;
    }

    /// <summary>
    /// What a checkpoint of a CLI run carries so that <c>resume CHECKPOINT</c> needs nothing else: the scenario file's
    /// bytes and the command line's options, as JSON in the checkpoint's application data.
    /// </summary>
    internal static class RunRecord
    {
        private const string Tool = "thermal-sampling";

        internal static string Write(Options o, byte[] scenario)
        {
            var buffer = new MemoryStream();
            using (var w = new System.Text.Json.Utf8JsonWriter(buffer))
            {
                w.WriteStartObject();
                w.WriteString("tool", Tool);
                w.WriteString("command", o.Command);
                w.WriteString("scenarioFile", o.File);
                w.WriteBase64String("scenario", scenario);
                void Number(string name, double? v)
                {
                    if (v is double d)
                    {
                        w.WriteNumber(name, d);
                    }
                }
                void Text(string name, string? v)
                {
                    if (v is not null)
                    {
                        w.WriteString(name, v);
                    }
                }
                Number("from", o.From);
                Number("to", o.To);
                Number("count", o.Count);
                Text("seed", o.Seed?.ToString(CultureInfo.InvariantCulture));
                Number("threads", o.Threads);
                w.WriteString("format", o.Format);
                Text("output", o.Output);
                Text("samples", o.Samples);
                Text("plot", o.Plot);
                w.WriteBoolean("quiet", o.Quiet);
                Number("checkpointEverySeconds", o.CheckpointEvery?.TotalSeconds);
                w.WriteEndObject();
            }
            return System.Text.Encoding.UTF8.GetString(buffer.ToArray());
        }

        internal static bool TryRead(string? data, out Options options, out byte[] scenario)
        {
            options = null!;
            scenario = [];
            if (data is null)
            {
                return false;
            }
            try
            {
                using var document = System.Text.Json.JsonDocument.Parse(data);
                var e = document.RootElement;
                if (!e.TryGetProperty("tool", out var tool) || tool.GetString() != Tool)
                {
                    return false;
                }
                double? Number(string name) => e.TryGetProperty(name, out var v) ? v.GetDouble() : null;
                string? Text(string name) => e.TryGetProperty(name, out var v) ? v.GetString() : null;
                scenario = e.GetProperty("scenario").GetBytesFromBase64();
                options = new Options(e.GetProperty("command").GetString()!, Text("scenarioFile"), e.GetProperty("format").GetString()!, Text("output"), Text("samples"),
                    Text("seed") is string seed ? ulong.Parse(seed, CultureInfo.InvariantCulture) : null, (int?)Number("threads"), e.GetProperty("quiet").GetBoolean(),
                    Number("from"), Number("to"), (int?)Number("count"), Text("plot"), null, null,
                    Number("checkpointEverySeconds") is double every ? TimeSpan.FromSeconds(every) : null);
                return options.Command is "run" or "sweep" && Renderers.Formats.Contains(options.Format);
            }
            catch (Exception ex) when (ex is System.Text.Json.JsonException or InvalidOperationException or FormatException or KeyNotFoundException or OverflowException)
            {
                return false;
            }
        }

        /// <summary>"500ms", "30s", "5m", "2h" (a positive number and a unit, at most a day), or null.</summary>
        internal static TimeSpan? ParseInterval(string? text)
        {
            if (text is null)
            {
                return null;
            }
            (string unit, double seconds) = text.EndsWith("ms", StringComparison.Ordinal) ? ("ms", 1e-3)
                : text.EndsWith('s') ? ("s", 1.0) : text.EndsWith('m') ? ("m", 60.0) : text.EndsWith('h') ? ("h", 3600.0) : ("", 0);
            if (unit.Length == 0 || !double.TryParse(text.AsSpan(0, text.Length - unit.Length), NumberStyles.AllowDecimalPoint, CultureInfo.InvariantCulture, out double n))
            {
                return null;
            }
            double total = n * seconds;
            return total > 0 && total <= 86_400 ? TimeSpan.FromSeconds(total) : null;
        }
    }
}
