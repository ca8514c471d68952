using System;
using System.CommandLine;
using System.CommandLine.Parsing;
using System.Globalization;
using System.IO;
using System.Linq;

namespace ThermalSampling.Cli;

/// <summary>
/// The commands and their typed options (System.CommandLine): the one source of the usage text, the per-command help
/// (<c>thermal-sampling COMMAND --help</c>, on standard output) and every check of the command line. A parsed command
/// hands its <see cref="Program.Options"/> to the caller, which runs it.
/// </summary>
internal static class CommandLine
{
    /// <summary>The command tree; <paramref name="accept"/> receives the options of the command that was given.</summary>
    internal static Command Build(Action<Program.Options> accept)
    {
        var scenario = new Argument<string>("SCENARIO.json") { Description = "The scenario file (keys in docs/cli.md)." };
        var checkpointFile = new Argument<string>("CHECKPOINT") { Description = "A checkpoint written by run or sweep with --checkpoint." };
        var format = new Option<string?>("--format") { Description = "table, json, markdown, csv, tidy-csv, json-lines or parquet (one row per temperature, quantity and method), or distribution-csv (the densities, one row per bin; default: table for demo, json otherwise).", HelpName = "F" };
        format.AcceptOnlyFromAmong(Renderers.Formats);
        var output = new Option<string?>("--output") { Description = "Write the report to FILE instead of standard output.", HelpName = "FILE" };
        var samples = new Option<string?>("--samples") { Description = "Also write the raw draws (up to 1 000 000 per chain) to FILE.csv.", HelpName = "FILE.csv" };
        var plot = new Option<string?>("--plot") { Description = "Also draw figures, named after FILE (.png or .svg).", HelpName = "FILE" };
        plot.Validators.Add(r =>
        {
            if (r.GetValueOrDefault<string?>() is string f && !FigureWriter.HasFigureExtension(f))
            {
                r.AddError($"--plot needs a file name ending in .png or .svg, not '{f}'.");
            }
        });
        var figures = new Option<string?>("--figures") { Description = $"Where demo writes its figures (default ./{Program.DefaultDemoFigureFolder}).", HelpName = "DIR" };
        var seed = new Option<ulong?>("--seed")
        {
            Description = "Override sampling.seed (0 to 18446744073709551615, as in the file and in C#).",
            HelpName = "N",
            CustomParser = r => ulong.TryParse(r.Tokens.Single().Value, NumberStyles.None, CultureInfo.InvariantCulture, out ulong v)
                ? v : Fail<ulong?>(r, "--seed needs a whole number from 0 to 18446744073709551615."),
        };
        var threads = new Option<int?>("--threads")
        {
            Description = "Worker threads, 1 to 1024 (results do not depend on it).",
            HelpName = "N",
            CustomParser = r => int.TryParse(r.Tokens.Single().Value, NumberStyles.None, CultureInfo.InvariantCulture, out int v) && v is >= 1 and <= 1024
                ? v : Fail<int?>(r, "--threads needs a whole number from 1 to 1024."),
        };
        var quiet = new Option<bool>("--quiet") { Description = "No progress output (progress goes to standard error)." };
        var checkpoint = new Option<string?>("--checkpoint") { Description = "Write the run's state to FILE as it goes and when stopped with Ctrl+C.", HelpName = "FILE" };
        checkpoint.Validators.Add(r =>
        {
            if (r.GetValueOrDefault<string?>() is string f && !Directory.Exists(Path.GetDirectoryName(Path.GetFullPath(f))))
            {
                r.AddError($"--checkpoint '{f}': the folder '{Path.GetDirectoryName(Path.GetFullPath(f))}' does not exist.");
            }
        });
        var every = new Option<TimeSpan?>("--checkpoint-every")
        {
            Description = "How often to checkpoint: a number and a unit, ms, s, m or h (default 60s).",
            HelpName = "T",
            CustomParser = r => Program.RunRecord.ParseInterval(r.Tokens.Single().Value) is TimeSpan t
                ? t : Fail<TimeSpan?>(r, $"--checkpoint-every '{r.Tokens.Single().Value}' is not a duration; give a number and a unit, such as 500ms, 30s, 5m or 2h (at most 24h)."),
        };
        Option<double?> Kelvin(string name, string description) => new(name)
        {
            Description = description,
            HelpName = "K",
            CustomParser = r => double.TryParse(r.Tokens.Single().Value, NumberStyles.Float, CultureInfo.InvariantCulture, out double k) && double.IsFinite(k) && k > 0 && k <= 1e7
                ? k : Fail<double?>(r, $"{name} needs a temperature in K, greater than 0 and at most 1e7."),
        };
        var from = Kelvin("--from", "The lowest temperature of the sweep, K.");
        var to = Kelvin("--to", "The highest temperature of the sweep, K.");
        var count = new Option<int?>("--count")
        {
            Description = $"How many temperatures, evenly spaced from --from to --to (1 to {ScenarioReader.MaximumTemperatures}).",
            HelpName = "N",
            CustomParser = r => int.TryParse(r.Tokens.Single().Value, NumberStyles.None, CultureInfo.InvariantCulture, out int n) && n >= 1 && n <= ScenarioReader.MaximumTemperatures
                ? n : Fail<int?>(r, $"--count needs a whole number from 1 to {ScenarioReader.MaximumTemperatures}."),
        };

        var shard = new Option<(int Index, int Count)?>("--shard")
        {
            Description = "Run one part of the sweep, I of N (for example 3/40: chains of every temperature split evenly over N parts), and write its records to --output FILE for 'merge'.",
            HelpName = "I/N",
            CustomParser = r => ParseShard(r.Tokens.Single().Value) is { } s
                ? s : Fail<(int, int)?>(r, $"--shard '{r.Tokens.Single().Value}' is not a part of a sweep; give I/N with 1 ≤ I ≤ N ≤ 100000, such as 3/40."),
        };
        var reweight = new Option<(double From, double To, int Count)?>("--reweight-to")
        {
            Description = "Also give results at N temperatures evenly spaced from K1 to K2, reweighted from the sampled ones (as the scenario key sampling.reweightTo; classical statistics).",
            HelpName = "K1..K2:N",
            CustomParser = r => ParseReweight(r.Tokens.Single().Value) is { } w
                ? w : Fail<(double, double, int)?>(r, $"--reweight-to '{r.Tokens.Single().Value}' is not a range of temperatures; give K1..K2:N with 0 < K1 < K2 ≤ 1e7 and 1 ≤ N ≤ 100000, such as 10..80:50."),
        };
        var parts = new Argument<string[]>("PART") { Description = "The files written by 'sweep --shard I/N --output FILE', every part once.", Arity = ArgumentArity.OneOrMore };
        var merge = new Command("merge", "Combine the parts of a sharded sweep into the document the one-process sweep writes (the same bits); refuses parts of other scenarios or library versions, duplicates and missing parts, naming them.")
        {
            parts, format, output,
        };

        var run = new Command("run", "Sample the scenario at every temperature and write the vibration report.")
        {
            scenario, format, output, samples, plot, seed, threads, quiet, checkpoint, every,
        };
        var sweep = new Command("sweep", "Like run; with --from, --to and --count the file's temperatures are replaced by --count values evenly spaced from --from to --to. With --shard I/N, run one part of it for 'merge'.")
        {
            scenario, from, to, count, shard, reweight, format, output, samples, plot, seed, threads, quiet, checkpoint, every,
        };
        var resume = new Command("resume", "Finish a run or sweep from its checkpoint with exactly the report the uninterrupted run would have written; keeps checkpointing to the same file.")
        {
            checkpointFile, format, output, samples, plot, threads, quiet, every,
        };
        var validate = new Command("validate", "Check a scenario without sampling: build the landscape, find and check the minimum, list every problem (with its JSON path) and the warnings a run gives before sampling.")
        {
            scenario,
        };
        var demo = new Command("demo", "Run two built-in, invented scenarios (an adatom at a surface hollow and the same atom on a line) and print tables.")
        {
            format, figures, threads, quiet,
        };
        // Options that belong to another command get a message that says where they belong, not just "unrecognized".
        Refuse(resume, "--seed", "--seed cannot change on resume: the checkpoint continues the original seed's chains.");
        Refuse(resume, "--checkpoint", "resume keeps writing to the checkpoint it reads; --checkpoint belongs to run and sweep.");
        foreach (var other in new[] { validate, demo })
        {
            Refuse(other, "--checkpoint", "--checkpoint belongs to run and sweep.");
        }
        foreach (var other in new[] { run, resume, validate, demo })
        {
            Refuse(other, "--from", "--from, --to and --count belong to sweep.");
            Refuse(other, "--to", "--from, --to and --count belong to sweep.");
            Refuse(other, "--count", "--from, --to and --count belong to sweep.");
        }
        Refuse(sweep, "--steps", "--steps is now --count (the number of temperatures; Monte Carlo steps are sampling.samplesPerChain).");
        foreach (var other in new[] { run, sweep, resume, validate })
        {
            Refuse(other, "--figures", "--figures belongs to demo; use --plot with run and sweep.");
        }
        Refuse(demo, "--plot", "demo always draws its figures; choose the folder with --figures.");

        every.Validators.Add(r =>
        {
            if (r.Parent is CommandResult c && c.Command.Name is "run" or "sweep" && c.GetResult(checkpoint) is null)
            {
                r.AddError("--checkpoint-every needs --checkpoint FILE.");
            }
        });
        sweep.Validators.Add(c =>
        {
            int given = (c.GetResult(from) is null ? 0 : 1) + (c.GetResult(to) is null ? 0 : 1) + (c.GetResult(count) is null ? 0 : 1);
            bool oldSteps = c.Children.Any(ch => ch is OptionResult o && o.Option.Name == "--steps"); // its own refusal says what to do
            if (given is 1 or 2 && !oldSteps)
            {
                c.AddError("sweep needs --from, --to and --count together (or none of them, for the scenario's own temperatures).");
            }
            if (c.GetResult(shard) is not null)
            {
                if (c.GetResult(output) is null)
                {
                    c.AddError("--shard needs --output FILE: a part is written to a file for 'merge'.");
                }
                foreach (var (option, name) in new (Option, string)[] { (checkpoint, "--checkpoint"), (samples, "--samples"), (plot, "--plot"), (format, "--format"), (reweight, "--reweight-to") })
                {
                    if (c.GetResult(option) is not null)
                    {
                        c.AddError($"{name} does not go with --shard: a part holds records, not a report; give it to 'merge' instead.");
                    }
                }
            }
            if (c.GetValue(from) is double f && c.GetValue(to) is double t && c.GetValue(count) is int n && n > 1 && !(f < t))
            {
                c.AddError("sweep needs --from below --to.");
            }
        });

        Program.Options Options(ParseResult r, string command, string? file) => new(
            command, file, r.GetValue(format) ?? (command == "demo" ? "table" : "json"),
            command == "validate" || command == "demo" ? null : r.GetValue(output),
            command == "validate" || command == "demo" ? null : r.GetValue(samples),
            command is "run" or "sweep" ? r.GetValue(seed) : null,
            command == "validate" ? null : r.GetValue(threads),
            command != "validate" && r.GetValue(quiet),
            command == "sweep" ? r.GetValue(from) : null, command == "sweep" ? r.GetValue(to) : null, command == "sweep" ? r.GetValue(count) : null,
            command is "run" or "sweep" or "resume" ? r.GetValue(plot) : null,
            command == "demo" ? r.GetValue(figures) : null,
            command is "run" or "sweep" && r.GetValue(checkpoint) is string c ? Path.GetFullPath(c) : null,
            command is "run" or "sweep" or "resume" ? r.GetValue(every) : null,
            r.GetValue(format) is not null,
            command == "sweep" ? r.GetValue(shard) : null,
            command == "merge" ? r.GetValue(parts) : null,
            command == "sweep" ? r.GetValue(reweight) : null);
        run.SetAction(r => accept(Options(r, "run", r.GetValue(scenario))));
        sweep.SetAction(r => accept(Options(r, "sweep", r.GetValue(scenario))));
        resume.SetAction(r => accept(Options(r, "resume", r.GetValue(checkpointFile))));
        validate.SetAction(r => accept(Options(r, "validate", r.GetValue(scenario))));
        demo.SetAction(r => accept(Options(r, "demo", null)));
        merge.SetAction(r => accept(Options(r, "merge", null)));

        // A plain command named as the tool is installed (a RootCommand would take the assembly's name), with help; the
        // version printed is the library's (with its source revision) rather than the assembly's.
        var root = new Command("thermal-sampling", "Thermal position distributions of atoms in interatomic potentials: exact, harmonic, first-order and sampled.")
        {
            demo, run, sweep, merge, resume, validate,
        };
        root.Options.Add(new System.CommandLine.Help.HelpOption());
        var version = new Option<bool>("--version") { Description = "Print the library version and exit." };
        root.Options.Add(version);
        root.SetAction(r =>
        {
            if (r.GetValue(version))
            {
                r.InvocationConfiguration.Output.WriteLine(Reports.Provenance.CurrentLibraryVersion);
                return Program.Success;
            }
            r.InvocationConfiguration.Error.WriteLine("error: give a command: demo, run, sweep, merge, resume or validate. Run 'thermal-sampling --help' for the commands.");
            return Program.InvalidInput;
        });
        return root;
    }

    /// <summary>"K1..K2:N" with 0 &lt; K1 &lt; K2 ≤ 1e7 (or K1 = K2 with N = 1) and 1 ≤ N ≤ 100 000, or null.</summary>
    internal static (double From, double To, int Count)? ParseReweight(string text)
    {
        var range = text.Split(':');
        var ends = range[0].Split("..");
        if (range.Length != 2 || ends.Length != 2)
        {
            return null;
        }
        if (!double.TryParse(ends[0], NumberStyles.Float, CultureInfo.InvariantCulture, out double a) || !double.TryParse(ends[1], NumberStyles.Float, CultureInfo.InvariantCulture, out double b)
            || !int.TryParse(range[1], NumberStyles.None, CultureInfo.InvariantCulture, out int n))
        {
            return null;
        }
        return a > 0 && b <= 1e7 && double.IsFinite(a) && double.IsFinite(b) && n >= 1 && n <= 100_000 && (a < b || (a == b && n == 1)) ? (a, b, n) : null;
    }

    /// <summary>"I/N" with 1 ≤ I ≤ N ≤ 100 000, or null.</summary>
    internal static (int Index, int Count)? ParseShard(string text)
    {
        var halves = text.Split('/');
        return halves.Length == 2 && int.TryParse(halves[0], NumberStyles.None, CultureInfo.InvariantCulture, out int i)
            && int.TryParse(halves[1], NumberStyles.None, CultureInfo.InvariantCulture, out int n) && i >= 1 && i <= n && n <= 100_000 ? (i, n) : null;
    }

    /// <summary>A hidden option on <paramref name="command"/> that is always an error naming where it belongs.</summary>
    private static void Refuse(Command command, string name, string message)
    {
        var option = new Option<string?>(name) { Hidden = true, Arity = ArgumentArity.ZeroOrOne };
        option.Validators.Add(r => r.AddError(message));
        command.Options.Add(option);
    }

    private static T Fail<T>(ArgumentResult result, string message)
    {
        result.AddError(message);
        return default!;
    }
}
