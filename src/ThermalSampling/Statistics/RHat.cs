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
        var scores = new ScoreTable(2 * chains.Count * half);
        // One sort serves all three: the bulk ranks, the median, and (by folding the sorted draws about the median, a
        // linear merge) the ranks of |x − median|; the same ranks as sorting each anew, so the same bits.
        var (keys, where) = Pooled(split);
        Array.Sort(keys, where);
        double bulk = Classic(NormalScores(keys, where, split, scores));
        int m = keys.Length / 2;
        double median = keys.Length % 2 == 1 ? keys[m] : 0.5 * (keys[m - 1] + keys[m]);
        var (folded, foldedWhere) = FoldedAbout(keys, where, median);
        double tail = Classic(NormalScores(folded, foldedWhere, split, scores));
        return Math.Max(bulk, tail);
    }

    /// <summary>Every draw of every chain in one array, with its flat index (chain · length + position).</summary>
    private static (double[] Keys, int[] Where) Pooled(List<double[]> chains)
    {
        int total = chains.Sum(c => c.Length);
        var keys = new double[total];
        var where = new int[total];
        int k = 0;
        foreach (var chain in chains)
        {
            foreach (double x in chain)
            {
                Internal.Preconditions.CheckFinite(x, "chains");
                where[k] = k;
                keys[k++] = x;
            }
        }
        return (keys, where);
    }

    /// <summary>
    /// |x − median| in ascending order from the sorted draws: the draws below the median read downwards and those from it
    /// upwards are each sorted by distance, so one merge orders them (median − x is the exact negation of x − median).
    /// </summary>
    private static (double[] Keys, int[] Where) FoldedAbout(double[] sorted, int[] where, double median)
    {
        int n = sorted.Length;
        int split = 0;
        while (split < n && sorted[split] < median)
        {
            split++; // the first draw not below the median
        }
        var keys = new double[n];
        var at = new int[n];
        int down = split - 1, up = split;
        for (int k = 0; k < n; k++)
        {
            double below = down >= 0 ? median - sorted[down] : double.PositiveInfinity;
            double above = up < n ? sorted[up] - median : double.PositiveInfinity;
            if (below < above)
            {
                keys[k] = below;
                at[k] = where[down--];
            }
            else
            {
                keys[k] = above;
                at[k] = where[up++];
            }
        }
        return (keys, at);
    }

    /// <summary>Φ⁻¹((rank − 3/8)/(S + 1/4)) for whole ranks, computed once and shared by the bulk and tail scores.</summary>
    private sealed class ScoreTable(int total)
    {
        private readonly double[] _whole = Filled(total);

        internal int Total => total;

        internal double At(double rank)
        {
            if (rank != Math.Floor(rank))
            {
                return Score(rank); // an average rank of tied values
            }
            ref double z = ref _whole[(int)rank - 1];
            if (double.IsNaN(z))
            {
                z = Score(rank);
            }
            return z;
        }

        private static double[] Filled(int n)
        {
            var a = new double[n];
            Array.Fill(a, double.NaN); // not yet computed
            return a;
        }

        private double Score(double rank) => Normal.InvCDF(0, 1, (rank - 0.375) / (total + 0.25));
    }

    /// <summary>Replaces each draw by its normal score with average ranks for ties, from the pooled draws sorted with their flat indices.</summary>
    private static List<double[]> NormalScores(double[] keys, int[] where, List<double[]> chains, ScoreTable scores)
    {
        int total = keys.Length;
        int length = chains[0].Length;
        var result = chains.Select(c => new double[c.Length]).ToList();
        int start = 0;
        while (start < total)
        {
            int end = start;
            while (end + 1 < total && keys[end + 1] == keys[start])
            {
                end++;
            }
            double z = scores.At(0.5 * (start + end) + 1);
            for (int j = start; j <= end; j++)
            {
                result[where[j] / length][where[j] % length] = z;
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
