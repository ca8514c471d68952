using System;
using System.Collections.Generic;
using System.Diagnostics;
using System.Globalization;
using System.IO;
using System.Threading;
using Spectre.Console;
using ThermalSampling.Sampling;

namespace ThermalSampling.Cli;

/// <summary>Plain, line-by-line progress for redirected output: one line per 10% of each temperature, with time left.</summary>
internal sealed class LineProgress : IProgress<SamplingProgress>
{
    private readonly TextWriter _writer;
    private readonly int _chains;
    private readonly Dictionary<int, (long Done, long Total)> _chainsDone = new();
    private readonly Stopwatch _clock = new();
    private readonly Lock _gate = new();
    private double _temperature = double.NaN;
    private int _lastDecile = -1;

    internal LineProgress(TextWriter writer, int chains)
    {
        _writer = writer;
        _chains = chains;
    }

    public void Report(SamplingProgress value)
    {
        lock (_gate)
        {
            if (value.Temperature != _temperature)
            {
                _temperature = value.Temperature;
                _chainsDone.Clear();
                _lastDecile = -1;
                _clock.Restart();
            }
            _chainsDone[value.ChainIndex] = (value.ChainStepsDone, value.ChainStepsTotal);
            long done = 0, total = 0;
            foreach (var (d, t) in _chainsDone.Values)
            {
                done += d;
                total += t;
            }
            total = total / _chainsDone.Count * _chains; // chains that have not reported yet have the same length
            int decile = (int)(10.0 * done / Math.Max(total, 1));
            if (decile > _lastDecile)
            {
                _lastDecile = decile;
                double elapsed = _clock.Elapsed.TotalSeconds;
                double left = done > 0 ? elapsed * (total - done) / done : double.NaN;
                _writer.WriteLine(string.Create(CultureInfo.InvariantCulture,
                    $"progress: T = {_temperature:G6} K: {10 * decile}%{(double.IsFinite(left) && decile < 10 ? $", about {left:F0} s left" : "")}"));
                _writer.Flush();
            }
        }
    }
}

/// <summary>Progress bars per chain and overall, with time left, on an interactive terminal (standard error).</summary>
internal static class InteractiveProgress
{
    internal static T Run<T>(int chains, int temperatures, long stepsPerChain, Func<IProgress<SamplingProgress>, T> work)
    {
        // Only used when standard error is a terminal: say so, because Spectre would otherwise judge by standard output,
        // which is usually redirected to the report file.
        var console = AnsiConsole.Create(new AnsiConsoleSettings { Out = new AnsiConsoleOutput(Console.Error), Ansi = AnsiSupport.Yes, Interactive = InteractionSupport.Yes });
        T result = default!;
        console.Progress()
            .AutoClear(true)
            .Columns(new TaskDescriptionColumn(), new ProgressBarColumn(), new PercentageColumn(), new RemainingTimeColumn())
            .Start(ctx =>
            {
                var overall = ctx.AddTask("all temperatures", maxValue: temperatures);
                var tasks = new ProgressTask[chains];
                for (int c = 0; c < chains; c++)
                {
                    tasks[c] = ctx.AddTask($"chain {c + 1}", maxValue: stepsPerChain);
                }
                var gate = new Lock();
                double current = double.NaN;
                int finishedTemperatures = -1;
                var direct = new DelegateProgress(p =>
                {
                    lock (gate)
                    {
                        if (p.Temperature != current)
                        {
                            current = p.Temperature;
                            finishedTemperatures++;
                            foreach (var t in tasks)
                            {
                                t.Value = 0;
                            }
                            overall.Description = string.Create(CultureInfo.InvariantCulture, $"T = {p.Temperature:G6} K");
                        }
                        tasks[p.ChainIndex].Value = p.ChainStepsDone;
                        double fraction = 0;
                        foreach (var t in tasks)
                        {
                            fraction += t.Value / stepsPerChain;
                        }
                        overall.Value = finishedTemperatures + fraction / chains;
                    }
                });
                result = work(direct);
                overall.Value = temperatures;
            });
        return result;
    }

    private sealed class DelegateProgress(Action<SamplingProgress> action) : IProgress<SamplingProgress>
    {
        public void Report(SamplingProgress value) => action(value);
    }
}
