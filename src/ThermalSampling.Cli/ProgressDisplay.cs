using System;
using System.Collections.Generic;
using System.Diagnostics;
using System.Globalization;
using System.IO;
using System.Threading;
using Spectre.Console;
using ThermalSampling.Sampling;

namespace ThermalSampling.Cli;

/// <summary>
/// Plain, line-by-line progress for redirected output: a line at the first percent of each temperature and at every 10 %,
/// with the time left for the whole run (all temperatures), estimated from the work done so far.
/// </summary>
internal sealed class LineProgress : IProgress<SamplingProgress>
{
    private readonly TextWriter _writer;
    private readonly int _chains, _temperatures;
    private readonly Dictionary<int, (long Done, long Total)> _chainsDone = new();
    private readonly Stopwatch _clock = Stopwatch.StartNew();
    private readonly Lock _gate = new();
    private double _temperature = double.NaN;
    private int _finished = -1, _lastMark = -1;

    internal LineProgress(TextWriter writer, int chains, int temperatures = 1)
    {
        _writer = writer;
        _chains = chains;
        _temperatures = temperatures;
    }

    public void Report(SamplingProgress value)
    {
        lock (_gate)
        {
            if (value.TemperatureInKelvin != _temperature)
            {
                _temperature = value.TemperatureInKelvin;
                _chainsDone.Clear();
                _lastMark = -1;
                _finished++;
            }
            _chainsDone[value.ChainIndex] = (value.ChainStepsDone, value.ChainStepsTotal);
            long done = 0, total = 0;
            foreach (var (d, t) in _chainsDone.Values)
            {
                done += d;
                total += t;
            }
            total = total / _chainsDone.Count * _chains; // chains that have not reported yet have the same length
            double fraction = (double)done / Math.Max(total, 1);
            int mark = fraction >= 0.01 && fraction < 0.1 ? 0 : (int)(10 * fraction); // 0: the first percent; then deciles
            if (mark > _lastMark && (fraction >= 0.01 || mark > 0))
            {
                _lastMark = mark;
                double overall = (_finished + fraction) / _temperatures;
                double elapsed = _clock.Elapsed.TotalSeconds;
                double left = overall > 0 ? elapsed * (1 - overall) / overall : double.NaN;
                string percent = mark == 0 ? "1%" : $"{10 * mark}%";
                _writer.WriteLine(string.Create(CultureInfo.InvariantCulture,
                    $"progress: T = {_temperature:G6} K: {percent}{(double.IsFinite(left) && overall < 1 ? $", about {Program.Duration(left)} left for the whole run" : "")}"));
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
                        if (p.TemperatureInKelvin != current)
                        {
                            current = p.TemperatureInKelvin;
                            finishedTemperatures++;
                            foreach (var t in tasks)
                            {
                                t.Value = 0;
                            }
                            overall.Description = string.Create(CultureInfo.InvariantCulture, $"T = {p.TemperatureInKelvin:G6} K");
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
