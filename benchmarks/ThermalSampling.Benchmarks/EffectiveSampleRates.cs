using System;
using System.Globalization;
using MathNet.Numerics.Distributions;
using MathNet.Numerics.Statistics.Mcmc;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Sampling;
using ThermalSampling.Statistics;
using ThermalSampling.Units;

namespace ThermalSampling.Benchmarks;

/// <summary>
/// Effective samples per step for each way of sampling the benchmark's Lennard-Jones line (<c>--ess</c>): the figure of
/// merit is ESS per second = (ESS per step) / (time per step), the time coming from the BenchmarkDotNet table. The
/// baselines' integrated autocorrelation times are measured with the library's Sokal estimator on 10^6 of their draws;
/// the library's come from its own report. Same invented parameters as <see cref="MetropolisStepBenchmarks"/>.
/// </summary>
internal static class EffectiveSampleRates
{
    private const double R0 = 3.82, U0 = 0.0103, Lower = 3.2, Upper = 6.0, Width = 0.12;
    private const int Steps = 1_000_000;

    internal static void Print()
    {
        double beta = 1 / Temperature.FromKelvin(40).ThermalEnergyInElectronVolts;
        double LogDensity(double r) => r < Lower || r > Upper ? double.NegativeInfinity : -beta * U0 * (Math.Pow(R0 / r, 12) - 2 * Math.Pow(R0 / r, 6));
        var c = CultureInfo.InvariantCulture;

#pragma warning disable RS0030, CA5394 // baseline only
        var random = new Random(1);
#pragma warning restore RS0030, CA5394
        var sampler = new MetropolisSampler<double>(R0, LogDensity, x => Normal.Sample(random, x, Width)) { RandomSource = random };
        var mathNet = new double[Steps];
        for (int i = 0; i < Steps; i++)
        {
            mathNet[i] = sampler.Sample();
        }
        var plain = new double[Steps];
        Baselines.PlainPairChain(Steps, R0, Width, LogDensity, plain);

        var lj = LennardJones.FromMinimum(Length.FromAngstroms(R0), Energy.FromElectronVolts(U0));
        var landscape = PairLandscape.Line(lj, Length.FromAngstroms(Lower), Length.FromAngstroms(Upper));
        var metropolis = PairSampler.Run(landscape, Mass.FromAtomicMassUnits(39.948), Temperature.FromKelvin(40),
            new SamplingSettings { Seed = 1, Chains = 16, SamplesPerChain = Steps / 16 * 4, BurnIn = 10_000 });
        var direct = PairSampler.Run(landscape, Mass.FromAtomicMassUnits(39.948), Temperature.FromKelvin(40),
            new SamplingSettings { Seed = 1, Chains = 16, SamplesPerChain = Steps / 16 * 4, Method = SamplingMethod.Direct });

        Console.WriteLine("| sampler | integrated autocorrelation time (steps) | ESS per step |");
        Console.WriteLine("|---|---:|---:|");
        void Row(string name, double tau) => Console.WriteLine(string.Format(c, "| {0} | {1:F2} | {2:F3} |", name, tau, 1 / tau));
        Row("MathNet MetropolisSampler (Gaussian proposal, width 0.12 Å)", Autocorrelation.Estimate(mathNet).IntegratedTime);
        Row("plain loop (Gaussian proposal, width 0.12 Å)", Autocorrelation.Estimate(plain).IntegratedTime);
        Row(string.Format(c, "library Metropolis (uniform proposal, tuned width {0:F3} Å, acceptance {1:P0})",
            metropolis.Diagnostics.FinalStepWidthInAngstroms, metropolis.Diagnostics.AcceptanceRate), metropolis.Diagnostics.AutocorrelationTime);
        Row("library direct (inverse-CDF table)", direct.Diagnostics.AutocorrelationTime);
    }
}
