using System;
using System.Linq;
using MathNet.Numerics.Distributions;
using ThermalSampling.Analysis;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Randomness;
using ThermalSampling.Reports;
using ThermalSampling.Sampling;
using ThermalSampling.Units;
using Xunit;

namespace ThermalSampling.Tests;

public class PairSamplerTests
{
    private static readonly Mass ArgonMass = Mass.FromAtomicMassUnits(39.948);
    private static readonly LennardJones Lj = LennardJones.FromMinimum(Length.FromAngstroms(3.8), Energy.FromKelvin(119.8)); // Sources.Argon (eps)
    private static readonly Morse Iron = new(Energy.FromElectronVolts(0.4174), 1.3885, Length.FromAngstroms(2.845)); // Sources.GirifalcoWeizer
    private static readonly Buckingham OxygenOxygen = new(Energy.FromElectronVolts(22764.0), Length.FromAngstroms(0.149), 27.88); // Sources.Buckingham

    private static SamplingSettings Settings(SamplingMethod method, ulong seed = 7, long samples = 100_000) => new()
    {
        Seed = seed, Method = method, Chains = 4, SamplesPerChain = samples, BurnIn = 5_000,
    };

    /// <summary>Kolmogorov–Smirnov distance of the stored draws from a CDF.</summary>
    private static double KolmogorovSmirnov(double[] sorted, Func<double, double> cdf)
    {
        double d = 0;
        int n = sorted.Length;
        for (int i = 0; i < n; i++)
        {
            double f = cdf(sorted[i]);
            d = Math.Max(d, Math.Max((i + 1.0) / n - f, f - (double)i / n));
        }
        return d;
    }

    private static double[] DirectDraws(InverseCdfTable table, int n, ulong seed)
    {
        var r = RandomStream.FromSeed(seed);
        var x = new double[n];
        for (int i = 0; i < n; i++)
        {
            x[i] = table.Draw(ref r);
        }
        Array.Sort(x);
        return x;
    }

    [Theory]
    [InlineData(SamplingMethod.Metropolis)]
    [InlineData(SamplingMethod.Direct)]
    public void Harmonic_bond_samples_a_Gaussian_of_variance_kT_over_k(SamplingMethod method)
    {
        // Closed form: variance kT/k. Mean and variance within 4 standard errors.
        var bond = new HarmonicBond(2.0, Length.FromAngstroms(2.0));
        var landscape = PairLandscape.Line(bond, Length.FromAngstroms(1.0), Length.FromAngstroms(3.0));
        var t = Temperature.FromKelvin(300);
        double variance = t.ThermalEnergyInElectronVolts / 2;
        var report = PairSampler.Run(landscape, ArgonMass, t, Settings(method));
        Assert.True(Math.Abs(report.Mean.ZScore(2.0)) < 4, $"mean z = {report.Mean.ZScore(2.0)}");
        Assert.True(Math.Abs(report.Variance.ZScore(variance)) < 4, $"variance z = {report.Variance.ZScore(variance)}");
        Assert.Equal(variance, report.Harmonic!.ClassicalVarianceInAngstromsSquared, 15);
        Assert.Empty(report.Warnings.Where(w => w.Code is WarningCodes.RHatHigh or WarningCodes.DisagreesWithExact));
        if (method == SamplingMethod.Metropolis)
        {
            Assert.InRange(report.Diagnostics.AcceptanceRate!.Value, 0.34, 0.54);
        }
        else
        {
            Assert.Null(report.Diagnostics.AcceptanceRate);
            Assert.InRange(report.Diagnostics.AutocorrelationTime, 0.9, 1.1); // independent draws
        }
    }

    [Fact]
    public void Direct_draws_of_a_harmonic_bond_pass_a_KS_test_against_MathNet_Normal()
    {
        var bond = new HarmonicBond(2.0, Length.FromAngstroms(2.0));
        var landscape = PairLandscape.Line(bond, Length.FromAngstroms(1.0), Length.FromAngstroms(3.0));
        var t = Temperature.FromKelvin(300);
        var table = InverseCdfTable.Build(ExactPairDistribution.Compute(landscape, t));
        const int n = 50_000;
        var x = DirectDraws(table, n, 99);
        double d = KolmogorovSmirnov(x, r => Normal.CDF(2.0, Math.Sqrt(t.ThermalEnergyInElectronVolts / 2), r));
        Assert.True(d < 1.95 / Math.Sqrt(n), $"KS distance {d}"); // alpha = 0.001 (asymptotic Kolmogorov, common practice)
    }

    [Fact]
    public void Metropolis_draws_of_a_harmonic_bond_thinned_well_beyond_tau_pass_a_KS_test_against_MathNet_Normal()
    {
        // Thinning by about 10 autocorrelation times makes the kept draws close to independent, so the KS test applies.
        var bond = new HarmonicBond(2.0, Length.FromAngstroms(2.0));
        var landscape = PairLandscape.Line(bond, Length.FromAngstroms(1.0), Length.FromAngstroms(3.0));
        var t = Temperature.FromKelvin(300);
        var report = PairSampler.Run(landscape, ArgonMass, t, Settings(SamplingMethod.Metropolis, samples: 200_000) with { RetainedDrawsPerChain = 200_000 });
        int every = (int)Math.Ceiling(10 * report.Diagnostics.AutocorrelationTime);
        var kept = report.Draws.Thinned(every).SelectMany(c => c).OrderBy(x => x).ToArray();
        Assert.True(kept.Length > 5000, $"{kept.Length} draws kept");
        double d = KolmogorovSmirnov(kept, r => Normal.CDF(2.0, Math.Sqrt(t.ThermalEnergyInElectronVolts / 2), r));
        Assert.True(d < 1.95 / Math.Sqrt(kept.Length), $"KS distance {d} with {kept.Length} draws");
        Assert.Equal(4, report.Draws.Chains.Length);
        Assert.Equal(200_000, report.Draws.Chains[0].Length);
        Assert.Equal((200_000 + every - 1) / every, report.Draws.Thinned(every)[0].Length);
    }

    [Fact]
    public void No_draws_are_retained_unless_asked()
        => Assert.True(PairSampler.Run(PairLandscape.Line(Iron, Length.FromAngstroms(2.0), Length.FromAngstroms(5.0)), ArgonMass, Temperature.FromKelvin(300),
            Settings(SamplingMethod.Direct, samples: 1000)).Draws.Chains.IsEmpty);

    public static TheoryData<string, SeparationGeometry, double> Cases => new()
    {
        { "lj", SeparationGeometry.Line, 20 }, { "lj", SeparationGeometry.Radial, 40 },
        { "morse", SeparationGeometry.Line, 300 }, { "morse", SeparationGeometry.Radial, 800 },
        { "buckingham", SeparationGeometry.Line, 300 }, { "buckingham", SeparationGeometry.Radial, 1000 },
    };

    private static PairVibrationReport Sample(string name, SeparationGeometry g, double kelvin, SamplingMethod method) => name switch
    {
        "lj" => PairSampler.Run(PairLandscape.Create(Lj, g, Length.FromAngstroms(3.2), Length.FromAngstroms(6.0)), ArgonMass, Temperature.FromKelvin(kelvin), Settings(method)),
        "morse" => PairSampler.Run(PairLandscape.Create(Iron, g, Length.FromAngstroms(2.0), Length.FromAngstroms(5.0)), ArgonMass, Temperature.FromKelvin(kelvin), Settings(method)),
        _ => PairSampler.Run(PairLandscape.Create(OxygenOxygen, g, Length.FromAngstroms(1.0), Length.FromAngstroms(2.0)), ArgonMass, Temperature.FromKelvin(kelvin), Settings(method)),
    };

    [Theory]
    [MemberData(nameof(Cases))]
    public void Metropolis_agrees_with_exact_quadrature_within_four_standard_errors(string name, SeparationGeometry geometry, double kelvin)
    {
        var report = Sample(name, geometry, kelvin, SamplingMethod.Metropolis);
        Assert.True(Math.Abs(report.Exact.ZScoreMean) < 4, $"mean z = {report.Exact.ZScoreMean}");
        Assert.True(Math.Abs(report.Exact.ZScoreVariance) < 4, $"variance z = {report.Exact.ZScoreVariance}");
        Assert.True(report.Diagnostics.RHat < 1.01, $"R-hat {report.Diagnostics.RHat}");
        // The ESS-based error bar and the blocking one agree within a factor of 1.5 (independent estimators of one quantity).
        Assert.InRange(report.Diagnostics.BlockingStandardError / report.Mean.StandardError, 0.67, 1.5);
    }

    [Theory]
    [MemberData(nameof(Cases))]
    public void Direct_sampling_agrees_with_exact_quadrature_and_passes_KS(string name, SeparationGeometry geometry, double kelvin)
    {
        var report = Sample(name, geometry, kelvin, SamplingMethod.Direct);
        Assert.True(Math.Abs(report.Exact.ZScoreMean) < 4, $"mean z = {report.Exact.ZScoreMean}");
        Assert.True(Math.Abs(report.Exact.ZScoreVariance) < 4, $"variance z = {report.Exact.ZScoreVariance}");
    }

    [Fact]
    public void Sampled_skewness_and_kurtosis_follow_the_exact_values()
    {
        // Independent draws (direct sampling), 4 × 100 000 of them. The sampling error of the skewness is about √(6/N)
        // for a near-normal distribution and larger for a skewed one; the bounds allow ten times that, and the
        // kurtosis bound ten times √(24/N). Reference: the exact quadrature (validated above).
        var landscape = PairLandscape.Radial(Iron, Length.FromAngstroms(2.0), Length.FromAngstroms(5.0));
        var t = Temperature.FromKelvin(800);
        var report = PairSampler.Run(landscape, ArgonMass, t, Settings(SamplingMethod.Direct));
        var exact = ExactPairDistribution.Compute(landscape, t);
        double n = report.Diagnostics.Draws;
        Assert.True(Math.Abs(report.Skewness - exact.Skewness) < 10 * Math.Sqrt(6 / n), $"{report.Skewness} vs {exact.Skewness}");
        Assert.True(Math.Abs(report.ExcessKurtosis - exact.ExcessKurtosis) < 10 * Math.Sqrt(24 / n), $"{report.ExcessKurtosis} vs {exact.ExcessKurtosis}");
        Assert.True(exact.Skewness > 0.1, "the Morse well is visibly skewed at this temperature");
    }

    [Theory]
    [MemberData(nameof(Cases))]
    public void Inverse_cdf_table_is_within_its_measured_error_and_passes_KS_against_the_exact_CDF(string name, SeparationGeometry geometry, double kelvin)
    {
        var exact = name switch
        {
            "lj" => ExactPairDistribution.Compute(PairLandscape.Create(Lj, geometry, Length.FromAngstroms(3.2), Length.FromAngstroms(6.0)), Temperature.FromKelvin(kelvin)),
            "morse" => ExactPairDistribution.Compute(PairLandscape.Create(Iron, geometry, Length.FromAngstroms(2.0), Length.FromAngstroms(5.0)), Temperature.FromKelvin(kelvin)),
            _ => ExactPairDistribution.Compute(PairLandscape.Create(OxygenOxygen, geometry, Length.FromAngstroms(1.0), Length.FromAngstroms(2.0)), Temperature.FromKelvin(kelvin)),
        };
        var table = InverseCdfTable.Build(exact);
        Assert.True(table.CdfInterpolationError < 1e-5, $"measured CDF error {table.CdfInterpolationError}");
        // Independent check of the documented bound at points the table never looked at (exact CDF by quadrature).
        for (int i = 1; i < 40; i++)
        {
            double r = exact.WindowLowerInAngstroms + (exact.WindowUpperInAngstroms - exact.WindowLowerInAngstroms) * (i + 0.37) / 41;
            Assert.True(Math.Abs(table.CumulativeProbability(r) - exact.CumulativeProbability(r)) <= table.CdfInterpolationError * 1.5 + 1e-9, $"at {r}");
        }
        const int n = 20_000;
        double d = KolmogorovSmirnov(DirectDraws(table, n, 5), exact.CumulativeProbability);
        Assert.True(d < 1.95 / Math.Sqrt(n), $"KS distance {d}");
    }

    [Fact]
    public void Same_seed_gives_identical_results_for_any_thread_count_and_other_seeds_differ()
    {
        var landscape = PairLandscape.Radial(Iron, Length.FromAngstroms(2.0), Length.FromAngstroms(5.0));
        var t = Temperature.FromKelvin(500);
        SamplingSettings S(int threads, ulong seed) => new() { Seed = seed, Chains = 8, SamplesPerChain = 20_000, BurnIn = 2_000, MaxThreads = threads };
        var one = PairSampler.Run(landscape, ArgonMass, t, S(1, 3));
        var two = PairSampler.Run(landscape, ArgonMass, t, S(2, 3));
        var eight = PairSampler.Run(landscape, ArgonMass, t, S(8, 3));
        Assert.Equal(one.Mean.Value, two.Mean.Value);
        Assert.Equal(one.Mean.Value, eight.Mean.Value);
        Assert.Equal(one.Variance, eight.Variance);
        Assert.Equal(one.Histogram.Density.ToArray(), eight.Histogram.Density.ToArray());
        Assert.Equal(one.Diagnostics.RHat, eight.Diagnostics.RHat);
        var other = PairSampler.Run(landscape, ArgonMass, t, S(2, 4));
        Assert.NotEqual(one.Mean.Value, other.Mean.Value);
    }

    [Fact]
    public void Histogram_integrates_to_one_and_follows_the_exact_density()
    {
        var landscape = PairLandscape.Line(Iron, Length.FromAngstroms(2.3), Length.FromAngstroms(3.8));
        var t = Temperature.FromKelvin(600);
        var report = PairSampler.Run(landscape, ArgonMass, t, Settings(SamplingMethod.Direct) with { HistogramBins = 30 });
        var exact = ExactPairDistribution.Compute(landscape, t);
        Assert.Equal(1.0, report.Histogram.Density.Sum() * report.Histogram.BinWidth, 12);
        for (int i = 0; i < 30; i++)
        {
            double lo = report.Histogram.Lower + i * report.Histogram.BinWidth;
            double expected = (exact.CumulativeProbability(lo + report.Histogram.BinWidth) - exact.CumulativeProbability(lo)) / report.Histogram.BinWidth;
            double se = Math.Max(report.Histogram.DensityStandardError[i], 1e-6);
            Assert.True(Math.Abs(report.Histogram.Density[i] - expected) < 5 * se, $"bin {i}: {report.Histogram.Density[i]} vs {expected} ± {se}");
        }
    }

    [Fact]
    public void Invalid_settings_are_all_reported_at_once()
    {
        var bad = new SamplingSettings { Seed = 1, Chains = 0, SamplesPerChain = 1, BurnIn = -1, HistogramBins = 1 };
        var ex = Assert.Throws<ArgumentException>(() => bad.Validate());
        Assert.Equal("settings", ex.ParamName);
        foreach (string name in new[] { "Chains", "SamplesPerChain", "BurnIn", "HistogramBins" })
        {
            Assert.Contains(name, ex.Message);
        }
    }

    [Fact]
    public void Cancellation_throws_and_returns_nothing_partial()
    {
        var landscape = PairLandscape.Line(Iron, Length.FromAngstroms(2.0), Length.FromAngstroms(5.0));
        using var cts = new System.Threading.CancellationTokenSource();
        cts.Cancel();
        Assert.ThrowsAny<OperationCanceledException>(() =>
            PairSampler.Run(landscape, ArgonMass, Temperature.FromKelvin(300), Settings(SamplingMethod.Metropolis), cancellationToken: cts.Token));
    }

    [Fact]
    public void Progress_is_reported_for_every_chain()
    {
        var landscape = PairLandscape.Line(Iron, Length.FromAngstroms(2.0), Length.FromAngstroms(5.0));
        var seen = new System.Collections.Concurrent.ConcurrentBag<SamplingProgress>();
        PairSampler.Run(landscape, ArgonMass, Temperature.FromKelvin(300), Settings(SamplingMethod.Metropolis, samples: 2_000_000), new SyncProgress(seen.Add));
        Assert.Equal(4, seen.Where(p => p.ChainStepsDone == p.ChainStepsTotal).Select(p => p.ChainIndex).Distinct().Count());
        foreach (var chain in seen.GroupBy(p => p.ChainIndex))
        {
            // Throttled: about 200 reports per chain, including intermediate ones, not one per step.
            Assert.InRange(chain.Count(), 50, 250);
            Assert.Contains(chain, p => p.ChainStepsDone > 0 && p.ChainStepsDone < p.ChainStepsTotal / 2);
        }
    }

    internal sealed class SyncProgress(Action<SamplingProgress> action) : IProgress<SamplingProgress>
    {
        public void Report(SamplingProgress value) => action(value);
    }

    [Fact]
    public void Weakly_bound_particle_reports_wall_mass_and_escape_warnings()
    {
        // Invented: an LJ well of 10 K at 30 K, held only by the window.
        var shallow = LennardJones.FromMinimum(Length.FromAngstroms(3.5), Energy.FromKelvin(10));
        var landscape = PairLandscape.Line(shallow, Length.FromAngstroms(3.0), Length.FromAngstroms(8.0));
        var report = PairSampler.Run(landscape, ArgonMass, Temperature.FromKelvin(30), Settings(SamplingMethod.Metropolis, samples: 50_000));
        Assert.Contains(report.Warnings, w => w.Code == WarningCodes.WallMass);
        Assert.Contains(report.Warnings, w => w.Code == WarningCodes.EscapeRisk);
        Assert.True(report.Exact.ProbabilityNearWalls > 0.1);
    }

    [Theory]
    [InlineData(SamplingMethod.Metropolis)]
    [InlineData(SamplingMethod.Direct)]
    public void The_mean_potential_energy_of_a_harmonic_line_is_half_kT(SamplingMethod method)
    {
        // Equipartition (common practice, no source): on a line, ⟨V⟩ − V_min = kT/2 and Var(V) = (kT)²/2 for V = k x²/2.
        // Invented bond k = 2 eV/Å² at 1.5 Å, window ±9σ (the walls remove less than 1e-18).
        var t = Temperature.FromKelvin(300);
        double kT = t.ThermalEnergyInElectronVolts, sigma = Math.Sqrt(kT / 2.0);
        var line = PairLandscape.Line(new HarmonicBond(2.0, Length.FromAngstroms(1.5)), Length.FromAngstroms(1.5 - 9 * sigma), Length.FromAngstroms(1.5 + 9 * sigma));
        var report = PairSampler.Run(line, Mass.FromAtomicMassUnits(12), t, Settings(method, samples: 100_000));
        Assert.True(Math.Abs(report.PotentialEnergy.Value - kT / 2) < 4 * report.PotentialEnergy.StandardError,
            $"⟨V⟩ − V_min = {report.PotentialEnergy.ToRoundedString()} eV against kT/2 = {kT / 2:G5} eV");
        Assert.InRange(report.PotentialEnergy.StandardError, 1e-6, 0.02 * kT);
        Assert.InRange(report.PotentialEnergyVarianceInElectronVoltsSquared / (kT * kT), 0.45, 0.55);
    }
}
