using System;
using BenchmarkDotNet.Attributes;
using ThermalSampling.Potentials;
using ThermalSampling.Units;

namespace ThermalSampling.Benchmarks;

/// <summary>
/// The cost of one Lennard-Jones energy through the library's struct potential (generic, inlined), against two
/// baselines in the same run: a delegate call and the textbook expression with Math.Pow.
/// Each operation sums 1024 energies so the loop overhead is amortised.
/// </summary>
[MemoryDiagnoser]
public class PotentialEvaluationBenchmarks
{
    private const int Count = 1024;
    private readonly double[] _r = new double[Count];
    private LennardJones _lj;
    private Func<double, double> _delegate = null!;

    [GlobalSetup]
    public void Setup()
    {
        _lj = LennardJones.FromMinimum(Length.FromAngstroms(3.8), Energy.FromElectronVolts(0.0103));
        for (int i = 0; i < Count; i++)
        {
            _r[i] = 3.2 + 3.0 * i / Count;
        }
        var lj = _lj;
        _delegate = lj.Energy;
    }

    [Benchmark(Baseline = true, OperationsPerInvoke = Count)]
    public double TextbookMathPow()
    {
        double sum = 0;
        foreach (double r in _r)
        {
            sum += 0.0103 * (Math.Pow(3.8 / r, 12) - 2 * Math.Pow(3.8 / r, 6));
        }
        return sum;
    }

    [Benchmark(OperationsPerInvoke = Count)]
    public double DelegateCall()
    {
        double sum = 0;
        foreach (double r in _r)
        {
            sum += _delegate(r);
        }
        return sum;
    }

    [Benchmark(OperationsPerInvoke = Count)]
    public double GenericStruct() => SumEnergies(_lj, _r);

    private static double SumEnergies<T>(T potential, double[] r) where T : struct, IPairPotential
    {
        double sum = 0;
        foreach (double x in r)
        {
            sum += potential.Energy(x);
        }
        return sum;
    }
}
