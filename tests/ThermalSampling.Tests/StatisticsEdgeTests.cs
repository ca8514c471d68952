using System;
using System.Linq;
using MathNet.Numerics.Statistics;
using ThermalSampling.Statistics;
using Xunit;

namespace ThermalSampling.Tests;

/// <summary>
/// The autocorrelation estimator's edges and the moment accumulator's small-count cases, against a plain implementation of
/// the published definitions and MathNet.Numerics (each check was a surviving mutant, docs/validation.md).
/// </summary>
public sealed class StatisticsEdgeTests
{
    /// <summary>Sokal (1997), written as plainly as possible: ρ(t) = C(t)/C(0) with C(t) = (1/n)Σ d_i d_{i+t}; τ(M) = 1 + 2Σ_{t≤M} ρ(t); the smallest M ≥ c·τ(M).</summary>
    private static (double Tau, int Window, bool Found) PlainSokal(double[] x, double c)
    {
        int n = x.Length;
        double mean = x.Average();
        var d = x.Select(v => v - mean).ToArray();
        double c0 = d.Sum(v => v * v);
        double tau = 1;
        for (int m = 1; m < n; m++)
        {
            double cm = 0;
            for (int i = 0; i + m < n; i++)
            {
                cm += d[i] * d[i + m];
            }
            tau += 2 * cm / c0;
            if (m >= c * tau)
            {
                return (tau, m, true);
            }
        }
        return (tau, n - 1, false);
    }

    private static double[] Ar1(int n, double phi, int seed)
    {
        var random = new MathNet.Numerics.Random.Xoshiro256StarStar(seed);
        var x = new double[n];
        for (int i = 1; i < n; i++)
        {
            x[i] = phi * x[i - 1] + MathNet.Numerics.Distributions.Normal.Sample(random, 0, 1);
        }
        return x;
    }

    [Theory]
    [InlineData(7, 0.3)]
    [InlineData(8, 0.3)]
    [InlineData(9, 0.0)]
    [InlineData(16, 0.5)]
    [InlineData(17, 0.5)]
    [InlineData(300, 0.6)]
    [InlineData(3000, 0.995)] // the window does not close within the 256 direct lags: the FFT path
    public void Tau_window_and_error_follow_the_published_definition(int n, double phi)
    {
        var x = Ar1(n, phi, n);
        foreach (double c in new[] { 1.0, 5.0, 20.0 })
        {
            var (tau, window, found) = PlainSokal(x, c);
            var e = Autocorrelation.Estimate(x, c);
            Assert.Equal(Math.Max(tau, 1.0 / n), e.IntegratedTime, 1e-9 * Math.Max(1, Math.Abs(tau)));
            Assert.Equal(window, e.Window);
            Assert.Equal(Math.Abs(tau) * Math.Sqrt(2.0 * (2 * window + 1) / n), e.StandardError, 1e-9 * Math.Max(1, Math.Abs(tau))); // Sokal's error of τ
            Assert.Equal(found && n >= Autocorrelation.MinimumLengthInAutocorrelationTimes * tau, e.IsReliable);
            if (found && !e.IsReliable)
            {
                Assert.Contains($"only {(n / tau).ToString("G3", System.Globalization.CultureInfo.InvariantCulture)} autocorrelation times long", e.Reason);
                Assert.Contains($"Run about {Math.Ceiling(Autocorrelation.MinimumLengthInAutocorrelationTimes * tau / n)} times longer", e.Reason);
            }
            if (!found)
            {
                Assert.Contains("No summation window", e.Reason);
            }
        }
    }

    [Fact]
    public void The_autocorrelation_estimator_refuses_what_it_cannot_estimate_and_handles_constant_series()
    {
        Assert.Contains("series has 1 values; at least 2 are needed", Assert.Throws<ArgumentException>(() => Autocorrelation.Estimate(new[] { 1.0 })).Message);
        var two = Autocorrelation.Estimate(new[] { 1.0, 2.0 });
        Assert.Equal(2, two.SampleCount);
        Assert.Equal("series", Assert.Throws<ArgumentOutOfRangeException>(() => Autocorrelation.Estimate(new[] { 1.0, double.NaN, 2.0 })).ParamName);
        Assert.Equal("windowFactor", Assert.Throws<ArgumentOutOfRangeException>(() => Autocorrelation.Estimate(new[] { 1.0, 2.0, 3.0 }, 0.5)).ParamName);
        var constant = Autocorrelation.Estimate(Enumerable.Repeat(4.2, 100).ToArray());
        Assert.Equal((1.0, 1, true, ""), (constant.IntegratedTime, constant.Window, constant.IsReliable, constant.Reason));
        // A shifted series has the same τ: the mean is removed first.
        var x = Ar1(500, 0.7, 3);
        Assert.Equal(Autocorrelation.Estimate(x).IntegratedTime, Autocorrelation.Estimate(x.Select(v => v + 1e3).ToArray()).IntegratedTime, 1e-9);
    }

    [Fact]
    public void Moments_of_small_and_constant_sets_are_defined_and_agree_with_MathNet()
    {
        Assert.Equal("count", Assert.Throws<ArgumentOutOfRangeException>(() => MomentAccumulator.FromSums(-1, 0, 0, 0, 0)).ParamName);
        var empty = MomentAccumulator.FromSums(0, 0, 0, 0, 0);
        Assert.Equal((0.0, 0.0, 0.0, 0.0, 0.0, 0.0), (empty.Variance, empty.CentralMoment2, empty.CentralMoment3, empty.CentralMoment4, empty.Skewness, empty.ExcessKurtosis));
        var one = new MomentAccumulator();
        one.Add(3.5);
        Assert.Equal((3.5, 0.0), (one.Mean, one.Variance));
        var constant = new MomentAccumulator();
        for (int i = 0; i < 10; i++)
        {
            constant.Add(2.0);
        }
        Assert.Equal((0.0, 0.0), (constant.Skewness, constant.ExcessKurtosis));

        double[] data = [1.0, 2.5, 2.0, 7.0, -1.0, 3.0];
        var m = new MomentAccumulator();
        foreach (double v in data)
        {
            m.Add(v);
        }
        double mean = data.Average();
        Assert.Equal(data.Variance(), m.Variance, 1e-12); // MathNet: the unbiased sample variance
        Assert.Equal(data.PopulationVariance(), m.CentralMoment2, 1e-12);
        Assert.Equal(data.Average(v => Math.Pow(v - mean, 3)), m.CentralMoment3, 1e-12);
        Assert.Equal(data.Average(v => Math.Pow(v - mean, 4)), m.CentralMoment4, 1e-12);
        Assert.Equal(data.PopulationSkewness(), m.Skewness, 1e-12);
        Assert.Equal(data.PopulationKurtosis(), m.ExcessKurtosis, 1e-12);

        // Merging with an empty accumulator returns the other one unchanged, bit for bit.
        var merged = MomentAccumulator.Merge(empty, m);
        Assert.Equal((m.Count, m.Mean, m.SumSquaredDeviations, m.SumCubedDeviations, m.SumFourthPowerDeviations),
            (merged.Count, merged.Mean, merged.SumSquaredDeviations, merged.SumCubedDeviations, merged.SumFourthPowerDeviations));
        merged = MomentAccumulator.Merge(m, empty);
        Assert.Equal((m.Count, m.Mean, m.SumSquaredDeviations), (merged.Count, merged.Mean, merged.SumSquaredDeviations));
    }
}
