using System.Linq;
using BenchmarkDotNet.Configs;
using BenchmarkDotNet.Jobs;
using BenchmarkDotNet.Running;

namespace ThermalSampling.Benchmarks;

/// <summary>
/// Entry point. <c>dotnet run -c Release --project benchmarks/ThermalSampling.Benchmarks -- --filter '*'</c> runs every
/// benchmark with a short job (a few minutes in all on two cores); add <c>--smoke</c> for a dry job that only proves the
/// benchmarks build and run (what CI does; it times nothing); <c>--ess</c> prints effective samples per step of each sampler, <c>--ring-ess</c> those of the path-integral walks.
/// </summary>
public static class Program
{
    public static void Main(string[] args)
    {
        if (args.Contains("--ess"))
        {
            EffectiveSampleRates.Print();
            return;
        }
        if (args.Contains("--ring-ess"))
        {
            RingEfficiency.Print();
            return;
        }
        bool smoke = args.Contains("--smoke");
        var job = smoke ? Job.Dry : Job.ShortRun.WithIterationCount(6); // three were too few for a steady median of the public-API cases
        var config = DefaultConfig.Instance.AddJob(job.AsDefault());
        BenchmarkSwitcher.FromAssembly(typeof(Program).Assembly).Run(args.Where(a => a != "--smoke").ToArray(), config);
    }
}
