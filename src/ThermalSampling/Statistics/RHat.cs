using System;
using System.Collections.Generic;
using System.Globalization;
using System.Linq;
using MathNet.Numerics.Distributions;

namespace ThermalSampling.Statistics;

/// <summary>
/// Rank-normalised split R-hat (Vehtari, Gelman, Simpson, Carpenter &amp; Bürkner, Bayesian Analysis 16, 667 (2021)):
/// every chain is split in half, all draws are replaced by the normal scores of their pooled ranks, and the classic
/// potential scale reduction is computed on those scores (bulk) and on the scores of |x − median| (tail); the larger is
/// reported. Values above 1.01 mean the chains have not mixed.
/// </summary>
public static class RHat
{
    /// <summary>The threshold recommended by Vehtari et al. (2021).</summary>
    public const double Threshold = 1.01;

    /// <summary>Computes the rank-normalised split R-hat of equal-length chains.</summary>
    /// <param name="chains">At least two chains of at least 4 finite draws each, all the same length.</param>
    public static double Compute(IReadOnlyList<double[]> chains)
    {
        Internal.Preconditions.CheckNotNull(chains, nameof(chains));
        if (chains.Count < 2)
        {
            throw new ArgumentException(string.Create(CultureInfo.InvariantCulture, $"chains has {chains.Count} chain(s); R-hat needs at least 2."), nameof(chains));
        }
        int n = chains[0].Length;
        if (n < 4 || chains.Any(c => c.Length != n))
        {
            throw new ArgumentException("chains must all have the same length, at least 4 draws each.", nameof(chains));
        }
        int half = n / 2;
        var split = new List<double[]>(2 * chains.Count);
        foreach (var c in chains)
        {
            split.Add(c[..half]);
            split.Add(c[(n - half)..]);
        }
        double bulk = Classic(NormalScores(split));
        double median = Median(split.SelectMany(c => c).ToArray());
        double tail = Classic(NormalScores(split.Select(c => c.Select(x => Math.Abs(x - median)).ToArray()).ToList()));
        return Math.Max(bulk, tail);
    }

    private static double Median(double[] values)
    {
        Array.Sort(values);
        int m = values.Length / 2;
        return values.Length % 2 == 1 ? values[m] : 0.5 * (values[m - 1] + values[m]);
    }

    /// <summary>Replaces each draw by Φ⁻¹((rank − 3/8)/(S + 1/4)) with average ranks for ties.</summary>
    private static List<double[]> NormalScores(List<double[]> chains)
    {
        int total = chains.Sum(c => c.Length);
        var index = new (double Value, int Chain, int Position)[total];
        int k = 0;
        for (int c = 0; c < chains.Count; c++)
        {
            for (int i = 0; i < chains[c].Length; i++)
            {
                Internal.Preconditions.CheckFinite(chains[c][i], "chains");
                index[k++] = (chains[c][i], c, i);
            }
        }
        Array.Sort(index, (a, b) => a.Value.CompareTo(b.Value));
        var result = chains.Select(c => new double[c.Length]).ToList();
        int start = 0;
        while (start < total)
        {
            int end = start;
            while (end + 1 < total && index[end + 1].Value == index[start].Value)
            {
                end++;
            }
            double rank = 0.5 * (start + end) + 1;
            double z = Normal.InvCDF(0, 1, (rank - 0.375) / (total + 0.25));
            for (int j = start; j <= end; j++)
            {
                result[index[j].Chain][index[j].Position] = z;
            }
            start = end + 1;
        }
        return result;
    }

    private static double Classic(List<double[]> chains)
    {
        int m = chains.Count, n = chains[0].Length;
        var means = chains.Select(c => c.Average()).ToArray();
        double grand = means.Average();
        double b = n / (m - 1.0) * means.Sum(x => (x - grand) * (x - grand));
        double w = 0;
        for (int j = 0; j < m; j++)
        {
            double s = 0;
            foreach (double x in chains[j])
            {
                s += (x - means[j]) * (x - means[j]);
            }
            w += s / (n - 1);
        }
        w /= m;
        if (!(w > 0))
        {
            return b > 0 ? double.PositiveInfinity : 1;
        }
        double varPlus = (n - 1.0) / n * w + b / n;
        return Math.Sqrt(varPlus / w);
    }
}
