using System;
using System.IO;
using BenchmarkDotNet.Attributes;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Sampling;
using ThermalSampling.Units;

namespace ThermalSampling.Benchmarks;

/// <summary>
/// What checkpointing costs: the same 16-chain Lennard-Jones pair run (two threads) without checkpoints (the baseline),
/// with a checkpoint every second (kept in memory), and with one at every 4096-step chunk boundary (the worst case);
/// plus writing and reading one checkpoint of that run. Invented parameters, as in <see cref="MetropolisStepBenchmarks"/>.
/// </summary>
[MemoryDiagnoser]
public class CheckpointBenchmarks
{
    private const int Chains = 16;
    private const int StepsPerChain = 2_000_000;
    private static readonly Temperature[] OneTemperature = [Temperature.FromKelvin(40)];
    private static readonly Mass Argon = Mass.FromAtomicMassUnits(39.948);
    private PairLandscape<LennardJones> _landscape = null!;
    private SamplingSettings _settings = null!;
    private SamplingCheckpoint _checkpoint = null!;
    private byte[] _bytes = [];

    [GlobalSetup]
    public void Setup()
    {
        var lj = LennardJones.FromMinimum(Length.FromAngstroms(3.82), Energy.FromElectronVolts(0.0103));
        _landscape = PairLandscape.Line(lj, Length.FromAngstroms(3.2), Length.FromAngstroms(6.0));
        _settings = new SamplingSettings { Seed = 1, Chains = Chains, SamplesPerChain = StepsPerChain, BurnIn = 1000, InitialStepWidthInAngstroms = 0.12, MaxThreads = 2 };
        SamplingCheckpoint? last = null;
        // The last checkpoint of a run checkpointed at every chunk: near the end, every batch mean filled (the largest state).
        PairSampler.SweepWithCheckpoints(_landscape, Argon, OneTemperature, _settings, new CheckpointOptions(TimeSpan.Zero, c => last = c));
        _checkpoint = last!;
        var m = new MemoryStream();
        _checkpoint.WriteTo(m);
        _bytes = m.ToArray();
    }

    [Benchmark(Baseline = true, OperationsPerInvoke = Chains * StepsPerChain)]
    public double NoCheckpoints() => PairSampler.Sweep(_landscape, Argon, OneTemperature, _settings)[0].Mean.Value;

    [Benchmark(OperationsPerInvoke = Chains * StepsPerChain)]
    public double CheckpointEverySecond() => PairSampler.SweepWithCheckpoints(_landscape, Argon, OneTemperature, _settings,
        new CheckpointOptions(TimeSpan.FromSeconds(1), c => c.WriteTo(Stream.Null)))[0].Mean.Value;

    [Benchmark(OperationsPerInvoke = Chains * StepsPerChain)]
    public double CheckpointEveryChunk() => PairSampler.SweepWithCheckpoints(_landscape, Argon, OneTemperature, _settings,
        new CheckpointOptions(TimeSpan.Zero, c => c.WriteTo(Stream.Null)))[0].Mean.Value;

    /// <summary>Serialising one checkpoint of the run (16 chains, 16 384 batch means each) with its SHA-256.</summary>
    [Benchmark]
    public long WriteOneCheckpoint()
    {
        var m = new MemoryStream();
        _checkpoint.WriteTo(m);
        return m.Length;
    }

    /// <summary>Reading and verifying it.</summary>
    [Benchmark]
    public long ReadOneCheckpoint() => SamplingCheckpoint.ReadFrom(new MemoryStream(_bytes)).ChainStepsDone;
}
