using BenchmarkDotNet.Running;

namespace ThermalSampling.Benchmarks;

/// <summary>Entry point: <c>dotnet run -c Release --project benchmarks/ThermalSampling.Benchmarks -- --filter '*'</c>.</summary>
public static class Program
{
    public static void Main(string[] args) => BenchmarkSwitcher.FromAssembly(typeof(Program).Assembly).Run(args);
}
