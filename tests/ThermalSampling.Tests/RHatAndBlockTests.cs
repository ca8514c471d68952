using System;
using System.Collections.Generic;
using System.Linq;
using MathNet.Numerics.Distributions;
using MathNet.Numerics.Statistics;
using ThermalSampling.Randomness;
using ThermalSampling.Statistics;
using Xunit;

namespace ThermalSampling.Tests;

/// <summary>
/// Fast direct checks of R-hat and of the sampling loops' blocked moment accumulator (before, only the sampler tests
/// reached them, which mutation testing cannot afford to run).
/// </summary>
public sealed class RHatAndBlockTests
{
    /// <summary>
    /// A second, plain implementation of the rank-normalised split R-hat written from the paper's equations
    /// ([paper] Vehtari, Gelman, Simpson, Carpenter &amp; Bürkner, Bayesian Analysis 16, 667 (2021), eqs. 3–4 and §4.2):
    /// split, pooled average ranks, z = Φ⁻¹((r − 3/8)/(S + 1/4)) with MathNet's normal quantile, the classic potential
    /// scale reduction on z (bulk) and on the z of |x − median| (tail), the larger of the two.
    /// </summary>
    private static double ReferenceRHat(IReadOnlyList<double[]> chains)
    {
        int n = chains[0].Length, half = n / 2;
        var split = chains.SelectMany(c => new[] { c.Take(half).ToArray(), c.Skip(n - half).ToArray() }).ToList();
        static List<double[]> Scores(List<double[]> parts)
        {
            var all = parts.SelectMany(p => p).OrderBy(v => v).ToArray();
            double total = all.Length;
            double Rank(double v)
            {
                int first = Array.IndexOf(all, v), last = Array.LastIndexOf(all, v);
                return (first + last) / 2.0 + 1;
            }
            return parts.Select(p => p.Select(v => Normal.InvCDF(0, 1, (Rank(v) - 0.375) / (total + 0.25))).ToArray()).ToList();
        }
        static double Classic(List<double[]> parts)
        {
            int m = parts.Count, len = parts[0].Length;
            var means = parts.Select(p => p.Mean()).ToArray();
            double b = len * means.Variance();
            double w = parts.Average(p => p.Variance());
            return Math.Sqrt(((len - 1.0) / len * w + b / len) / w);
        }
        double median = split.SelectMany(p => p).Median();
        return Math.Max(Classic(Scores(split)), Classic(Scores(split.Select(p => p.Select(v => Math.Abs(v - median)).ToArray()).ToList())));
    }

    private static double[] Normals(ulong seed, int n, double shift = 0, double scale = 1)
    {
        var random = RandomStream.FromSeed(seed);
        return Enumerable.Range(0, n).Select(_ => shift + scale * random.NextStandardNormal()).ToArray();
    }

    [Theory]
    [InlineData(2, 50, 0.0, 1.0)]
    [InlineData(4, 201, 0.0, 1.0)]
    [InlineData(3, 120, 0.7, 1.0)]
    [InlineData(4, 100, 0.0, 3.0)]
    public void RHatMatchesAPlainImplementationOfThePublishedDefinition(int chains, int length, double shiftOfLast, double scaleOfLast)
    {
        var data = Enumerable.Range(0, chains)
            .Select(c => c == chains - 1 ? Normals((ulong)(10 + c), length, shiftOfLast, scaleOfLast) : Normals((ulong)(10 + c), length))
            .ToList();
        Assert.Equal(ReferenceRHat(data), RHat.Compute(data), 12);
    }

    [Fact]
    public void RHatHandlesTiesWithAverageRanks()
    {
        var data = new List<double[]>
        {
            new[] { 1.0, 2, 2, 3, 1, 2, 3, 3 },
            new[] { 2.0, 2, 1, 1, 3, 2, 2, 1 },
        };
        Assert.Equal(ReferenceRHat(data), RHat.Compute(data), 12);
    }

    [Fact]
    public void RHatIsNearOneForMixedChainsAndLargeForSeparatedOnes()
    {
        var mixed = Enumerable.Range(0, 4).Select(c => Normals((ulong)(20 + c), 4000)).ToList();
        Assert.InRange(RHat.Compute(mixed), 0.99, RHat.Threshold);
        var separated = Enumerable.Range(0, 4).Select(c => Normals((ulong)(30 + c), 4000, c % 2 == 0 ? 0 : 3)).ToList();
        Assert.True(RHat.Compute(separated) > 1.5);
    }

    [Fact]
    public void RHatRefusesTooFewChainsOrUnequalLengthsByName()
    {
        Assert.Contains("chains", Assert.Throws<ArgumentException>(() => RHat.Compute(new[] { new double[10] })).Message, StringComparison.Ordinal);
        Assert.Throws<ArgumentException>(() => RHat.Compute(new[] { new double[10], new double[9] }));
        var tooShort = Assert.Throws<ArgumentException>(() => RHat.Compute(new[] { new double[3], new double[3] }));
        Assert.Equal("chains", tooShort.ParamName);
        Assert.Contains("at least 4 draws each", tooShort.Message);
        Assert.Equal("chains", Assert.ThrowsAny<ArgumentException>(() => RHat.Compute(new[] { new[] { 1.0, 2, 3, double.NaN }, new[] { 1.0, 2, 3, 4 } })).ParamName);
        Assert.Equal("chains", Assert.Throws<ArgumentNullException>(() => RHat.Compute(null!)).ParamName);
        // Four draws each is the documented minimum, and is accepted.
        Assert.True(double.IsFinite(RHat.Compute(new[] { new[] { 1.0, 2, 3, 4 }, new[] { 1.5, 2.5, 3.5, 0.5 } })));
    }

    /// <summary>Reference: MathNet's DescriptiveStatistics (an independent library), over several blocks of 4096 and a partial one.</summary>
    [Theory]
    [InlineData(1)]
    [InlineData(4095)]
    [InlineData(4096)]
    [InlineData(4097)]
    [InlineData(20_000)]
    public void BlockedMomentsMatchMathNet(int count)
    {
        var x = Normals(5, count, 1e3, 0.01).Select((v, i) => v + 1e-3 * Math.Sin(i)).ToArray(); // a large offset: the block references must carry it
        var blocked = new BlockedMomentAccumulator();
        foreach (double v in x)
        {
            blocked.Add(v);
        }
        var m = blocked.Complete();
        Assert.Equal(count, m.Count);
        Assert.Equal(x.Mean(), m.Mean, 10);
        if (count > 3)
        {
            var ds = new DescriptiveStatistics(x);
            Assert.Equal(ds.Variance, m.Variance, 1e-9 * ds.Variance);
            Assert.Equal(ds.Skewness, m.Skewness * Math.Sqrt(count * (count - 1.0)) / (count - 2), 1e-6);
            double m2 = x.Select(v => Math.Pow(v - x.Mean(), 2)).Average(), m4 = x.Select(v => Math.Pow(v - x.Mean(), 4)).Average();
            Assert.Equal(m4 / (m2 * m2) - 3, m.ExcessKurtosis, 1e-6);
        }
    }

    [Fact]
    public void BlockedMomentsAddBlockEqualsAddingTheValues()
    {
        var x = Normals(6, 1000, 2.5, 0.3);
        var one = new BlockedMomentAccumulator();
        foreach (double v in x)
        {
            one.Add(v);
        }
        var other = new BlockedMomentAccumulator();
        double reference = 2.4, s1 = 0, s2 = 0, s3 = 0, s4 = 0;
        foreach (double v in x)
        {
            double d = v - reference;
            (s1, s2, s3, s4) = (s1 + d, s2 + d * d, s3 + d * d * d, s4 + d * d * d * d);
        }
        other.AddBlock(x.Length, reference, s1, s2, s3, s4);
        var a = one.Complete();
        var b = other.Complete();
        Assert.Equal(a.Count, b.Count);
        Assert.Equal(a.Mean, b.Mean, 12);
        Assert.Equal(a.SumSquaredDeviations, b.SumSquaredDeviations, 1e-9 * a.SumSquaredDeviations);
        Assert.Equal(a.SumCubedDeviations, b.SumCubedDeviations, 1e-8 * Math.Abs(a.SumSquaredDeviations));
        Assert.Equal(a.SumFourthPowerDeviations, b.SumFourthPowerDeviations, 1e-8 * a.SumFourthPowerDeviations);
        Assert.Equal(0, new BlockedMomentAccumulator().Complete().Count);
    }

    /// <summary>AR(1) x_t = φx_{t−1} + ε_t with unit normal ε (MathNet), started from its stationary law N(0, 1/(1 − φ²)).</summary>
    private static double[] StationaryAr1(MathNet.Numerics.Random.Xoshiro256StarStar random, double phi, int n)
    {
        var x = new double[n];
        x[0] = Normal.Sample(random, 0, 1 / Math.Sqrt(1 - phi * phi));
        for (int t = 1; t < n; t++)
        {
            x[t] = phi * x[t - 1] + Normal.Sample(random, 0, 1);
        }
        return x;
    }

    /// <summary>
    /// The exact variance of the mean of N draws of a stationary AR(1): γ(t) = φ^|t|/(1 − φ²), so
    /// Var(x̄) = [γ(0) + 2Σ_{t=1}^{N−1}(1 − t/N)γ(t)]/N ([common practice, no source]: the autocovariance of AR(1) and
    /// the variance of a mean of correlated draws, as in any time-series text).
    /// </summary>
    private static double ExactVarianceOfAr1Mean(double phi, int n)
    {
        double sum = 1, power = 1;
        for (int t = 1; t < n; t++)
        {
            power *= phi;
            sum += 2 * (1 - (double)t / n) * power;
        }
        return sum / (1 - phi * phi) / n;
    }

    [Fact]
    public void PooledErrorOfTheMeanIsThatOfThePlainAverageOfTheChains()
    {
        // Four chains that mix at different rates (φ = 0, 0.5, 0.8, 0.9: τ = 1, 3, 9, 19), as chains that adapted different
        // widths do. The pooled mean is the plain average of the chain means, so its variance is Σ_c Var(x̄_c)/16, which
        // the slowest chain dominates. Summing per-chain effective sample sizes instead gives 1/Σ_c(1/Var(x̄_c)), about
        // ten times too small here. 400 replicates: the slowest chain's Var(x̄_c) estimate scatters by about 30% per
        // replicate (τ·√(2(2M + 1)/N) with M ≈ 5τ), so the average carries about 1.5%; ±8% is five of those.
        double[] phis = { 0, 0.5, 0.8, 0.9 };
        const int n = 4096, replicates = 400;
        double exact = phis.Sum(phi => ExactVarianceOfAr1Mean(phi, n)) / (phis.Length * phis.Length);
        var random = new MathNet.Numerics.Random.Xoshiro256StarStar(2026);
        double reportedSum = 0;
        var pooledMeans = new List<double>();
        for (int r = 0; r < replicates; r++)
        {
            var chains = phis.Select(phi => StationaryAr1(random, phi, n)).ToList();
            double variancePerDraw = chains.SelectMany(c => c).Variance();
            var summary = ThermalSampling.Statistics.ChainDiagnostics.Summarise(chains, 1, n, variancePerDraw);
            reportedSum += variancePerDraw / summary.Ess;
            Assert.Equal(phis.Length * (double)n / summary.Ess, summary.Tau, 12);
            pooledMeans.Add(chains.Average(c => c.Average()));
        }
        double ratio = reportedSum / replicates / exact;
        Assert.True(ratio >= 0.92 && ratio <= 1.08, $"reported Var(mean) / exact = {ratio:F3}");
        // The reference itself: the spread of the 400 pooled means (χ² with 399 degrees of freedom: ±4σ is about ±28%).
        Assert.InRange(pooledMeans.Variance() / exact, 0.72, 1.28);
    }
}
