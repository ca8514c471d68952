using System;
using System.Linq;
using FsCheck;
using FsCheck.Fluent;
using FsCheck.Xunit;
using MathNet.Numerics.Statistics;
using ThermalSampling.Randomness;
using ThermalSampling.Statistics;
using Xunit;

namespace ThermalSampling.Tests;

public class StatisticsTests
{
    private static double[] Ar1(double phi, int n, ulong seed)
    {
        // x_t = φ x_{t−1} + ε_t, started from the stationary distribution.
        var s = RandomStream.FromSeed(seed);
        var x = new double[n];
        x[0] = s.NextStandardNormal() / Math.Sqrt(1 - phi * phi);
        for (int t = 1; t < n; t++)
        {
            x[t] = phi * x[t - 1] + s.NextStandardNormal();
        }
        return x;
    }

    [Theory]
    [InlineData(0.5, 3.0)]
    [InlineData(0.8, 9.0)]
    [InlineData(0.9, 19.0)]
    public void Integrated_autocorrelation_time_of_AR1_matches_the_closed_form(double phi, double tau)
    {
        // Closed form tau = (1 + phi)/(1 − phi): 3, 9, 19 for phi = 0.5, 0.8, 0.9. Tolerance: 4 of the estimate's own standard errors.
        var x = Ar1(phi, 1 << 18, 11);
        var est = Autocorrelation.Estimate(x);
        Assert.True(est.IsReliable, est.Reason);
        Assert.True(Math.Abs(est.IntegratedTime - tau) < 4 * est.StandardError, $"tau {est.IntegratedTime} ± {est.StandardError} vs {tau}");
        Assert.Equal(x.Length / est.IntegratedTime, est.EffectiveSampleSize, 9);
    }

    [Theory]
    [InlineData(0.9)]   // window closes within the directly summed lags
    [InlineData(0.995)] // window beyond 256 lags: the FFT path
    public void Direct_and_FFT_autocorrelation_paths_give_the_same_tau(double phi)
    {
        var x = Ar1(phi, 1 << 16, 21);
        var est = Autocorrelation.Estimate(x);
        var rho = Autocorrelation.Function(x);
        double tau = 1;
        for (int m = 1; m <= est.Window; m++)
        {
            tau += 2 * rho[m];
        }
        Assert.Equal(tau, est.IntegratedTime, 9);
    }

    [Fact]
    public void Short_series_gets_an_unreliable_flag_with_a_reason()
    {
        var est = Autocorrelation.Estimate(Ar1(0.99, 500, 3));
        Assert.False(est.IsReliable);
        Assert.Contains("Run", est.Reason);
    }

    [Theory]
    [InlineData(0.5)]
    [InlineData(0.9)]
    public void Blocking_standard_error_matches_the_exact_variance_of_the_AR1_mean(double phi)
    {
        // Exact Var(x̄) = (σ²/N)[1 + 2Σ_{t=1}^{N−1}(1 − t/N)φ^t] with σ² = 1/(1 − φ²) (closed form).
        const int n = 1 << 18;
        double sum = 0, p = 1;
        for (int t = 1; t < n && p > 1e-300; t++)
        {
            p *= phi;
            sum += (1 - (double)t / n) * p;
        }
        double exact = Math.Sqrt(1 / (1 - phi * phi) / n * (1 + 2 * sum));
        var est = Blocking.Estimate(Ar1(phi, n, 5));
        Assert.True(est.IsReliable, est.Reason);
        var level = est.Levels[est.ChosenLevel];
        Assert.True(Math.Abs(level.StandardError - exact) < 4 * level.StandardErrorUncertainty, $"{level.StandardError} ± {level.StandardErrorUncertainty} vs {exact}");
    }

    [Fact]
    public void Moments_match_MathNet_descriptive_statistics()
    {
        var x = Ar1(0.3, 10000, 9).Select(v => v * v).ToArray(); // skewed data
        var acc = new MomentAccumulator();
        foreach (double v in x)
        {
            acc.Add(v);
        }
        var ds = new DescriptiveStatistics(x);
        Assert.Equal(ds.Mean, acc.Mean, 12);
        Assert.Equal(ds.Variance, acc.Variance, 10);
        Assert.Equal(x.PopulationSkewness(), acc.Skewness, 9);
        Assert.Equal(x.PopulationKurtosis(), acc.ExcessKurtosis, 8);
    }

    private static MomentAccumulator Accumulate(double[] x)
    {
        var a = new MomentAccumulator();
        foreach (double v in x)
        {
            a.Add(v);
        }
        return a;
    }

    private static bool Close(double a, double b) => Math.Abs(a - b) <= 1e-9 * Math.Max(1, Math.Max(Math.Abs(a), Math.Abs(b)));

    [Property(MaxTest = 200)]
    public Property Merging_is_associative_and_matches_a_single_pass() => Prop.ForAll(
        (from seed in Gen.Choose(0, int.MaxValue) from n1 in Gen.Choose(0, 50) from n2 in Gen.Choose(0, 50) from n3 in Gen.Choose(1, 50)
         select (seed, n1, n2, n3)).ToArbitrary(), t =>
        {
            var all = Ar1(0.4, t.n1 + t.n2 + t.n3, (ulong)t.seed).Select(v => 3 + v * Math.Abs(v)).ToArray();
            var a = Accumulate(all[..t.n1]);
            var b = Accumulate(all[t.n1..(t.n1 + t.n2)]);
            var c = Accumulate(all[(t.n1 + t.n2)..]);
            var whole = Accumulate(all);
            var left = MomentAccumulator.Merge(MomentAccumulator.Merge(a, b), c);
            var right = MomentAccumulator.Merge(a, MomentAccumulator.Merge(b, c));
            return left.Count == whole.Count && right.Count == whole.Count
                && Close(left.Mean, whole.Mean) && Close(right.Mean, whole.Mean)
                && Close(left.SumSquaredDeviations, whole.SumSquaredDeviations) && Close(right.SumSquaredDeviations, whole.SumSquaredDeviations)
                && Close(left.SumCubedDeviations, whole.SumCubedDeviations) && Close(right.SumCubedDeviations, whole.SumCubedDeviations)
                && Close(left.SumFourthPowerDeviations, whole.SumFourthPowerDeviations) && Close(right.SumFourthPowerDeviations, whole.SumFourthPowerDeviations);
        });
}

public class BlockedMomentTests
{
    [Theory]
    [InlineData(10, 0.0)]
    [InlineData(10_000, 0.0)]
    [InlineData(100_000, 1e4)] // values far from zero: the per-block reference keeps precision
    public void Blocked_accumulation_matches_the_per_value_update(int n, double offset)
    {
        var random = ThermalSampling.Randomness.RandomStream.FromSeed(8);
        var single = new MomentAccumulator();
        var blocked = new BlockedMomentAccumulator();
        for (int i = 0; i < n; i++)
        {
            double z = random.NextStandardNormal();
            double x = offset + 0.1 * z + 0.05 * z * z; // skewed
            single.Add(x);
            blocked.Add(x);
        }
        var b = blocked.Complete();
        Assert.Equal(single.Count, b.Count);
        Assert.True(Math.Abs(single.Mean - b.Mean) <= 1e-13 * Math.Max(1, Math.Abs(single.Mean)));
        Assert.True(Math.Abs(single.Variance - b.Variance) < 1e-9 * single.Variance);
        Assert.True(Math.Abs(single.Skewness - b.Skewness) < 1e-6);
        Assert.True(Math.Abs(single.ExcessKurtosis - b.ExcessKurtosis) < 1e-6);
    }
}
