using System;
using System.IO;
using ThermalSampling.Analysis;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Units;
using Xunit;

namespace ThermalSampling.Tests;

/// <summary>Runs the README's quick start (kept identical, less the Console lines) so the documented code cannot rot.</summary>
public class ReadmeTests
{
    [Fact]
    public void Readme_quick_start_runs_and_gives_sensible_numbers()
    {
        var pair = LennardJones.FromSigmaEpsilon(Length.FromAngstroms(3.405), Energy.FromKelvin(119.8));
        var line = PairLandscape.Line(pair, Length.FromAngstroms(3.2), Length.FromAngstroms(6.0));
        var t = Temperature.FromKelvin(30);

        var exact = ExactPairDistribution.Compute(line, t);
        var first = PairAnalysis.FirstOrder(line, t);
        var harmonic = PairAnalysis.Harmonic(line, Mass.FromAtomicMassUnits(39.948), t);
        var verdict = ClassicalValidity.AssessPair(line, Mass.FromAtomicMassUnits(39.948), t);

        Assert.True(exact.MeanInAngstroms - harmonic.EquilibriumDistanceInAngstroms > first.MeanShiftInAngstroms * 0.9);
        Assert.True(exact.RmsInAngstroms > harmonic.ClassicalRmsInAngstroms);
        Assert.Contains(verdict.Warnings, w => w.Code == WarningCodes.EscapeRisk); // kT = 0.25 eps: a shallow well at 30 K
    }

    [Fact]
    public void Readme_sampling_quick_start_runs()
    {
        var pair = LennardJones.FromSigmaEpsilon(Length.FromAngstroms(3.405), Energy.FromKelvin(119.8));
        var line = PairLandscape.Line(pair, Length.FromAngstroms(3.2), Length.FromAngstroms(6.0));
        var settings = new ThermalSampling.Sampling.SamplingSettings { Seed = 42, Chains = 4, SamplesPerChain = 100_000, BurnIn = 10_000 };
        var r = ThermalSampling.PairSampler.Run(line, Mass.FromAtomicMassUnits(39.948), Temperature.FromKelvin(30), settings);
        Assert.True(Math.Abs(r.Exact.ZScoreMean) < 4);
        Assert.True(r.MeanShift!.Value > 0 && r.Rms.Value > r.Harmonic!.ClassicalRmsInAngstroms);
        Assert.True(r.Diagnostics.RHat < 1.01);
    }

    [Fact]
    public void Readme_mentions_the_commands_that_ci_runs()
    {
        string root = Repository.Root;
        string readme = File.ReadAllText(Path.Combine(root, "README.md"));
        string ci = File.ReadAllText(Path.Combine(root, ".ci", "run"));
        Assert.Contains("dotnet test ThermalSampling.sln -c Release", readme);
        Assert.Contains("dotnet test ThermalSampling.sln -c Release", ci);
        Assert.Contains("dotnet run -c Release --project src/ThermalSampling.Cli -- demo", readme);
        Assert.Contains("--project src/ThermalSampling.Cli -- demo", ci);
    }

    /// <summary>The quick start's path-integral lines (the invented 50 u atom and 15 meV partner at 10 K): the quantum RMS is near the grid's and well above the classical.</summary>
    [Fact]
    public void Readme_path_integral_quick_start_runs()
    {
        var pair = LennardJones.FromMinimum(Length.FromAngstroms(3.5), Energy.FromElectronVolts(0.015));
        var line = PairLandscape.Line(pair, Length.FromAngstroms(3.0), Length.FromAngstroms(6.0));
        var settings = new ThermalSampling.Sampling.SamplingSettings { Seed = 42, Chains = 4, SamplesPerChain = 100_000, BurnIn = 10_000 };
        var q = ThermalSampling.PathIntegralSampler.RunPair(line, Mass.FromAtomicMassUnits(50), Temperature.FromKelvin(10), settings);
        Assert.True(Math.Abs(q.Rms.Value - q.Exact.RmsInAngstroms) < 4 * q.Rms.StandardError + 0.005 * q.Exact.RmsInAngstroms);
        Assert.True(q.Rms.Value > 1.15 * q.Classical.Rms.Value);
        Assert.True(q.PathIntegral.Converged);
    }
}
