using System;
using System.Collections.Generic;
using System.Linq;
using ThermalSampling.Persistence;

namespace ThermalSampling.Statistics;

/// <summary>
/// One chain's raw power sums, to fourth order, of a displacement of one or three coordinates about a fixed reference
/// (the minimum), kept in up to <see cref="MaxGroups"/> groups of consecutive draws so that the cumulants' standard errors
/// follow by the jackknife over groups. Constant memory however long the chain. Sums are added per block of draws
/// (the lane kernels') or per draw (the direct samplers').
/// </summary>
/// <remarks>
/// Sum order within a group: the count, then first order (x; or x, y, z), second (xx; or xx, xy, xz, yy, yz, zz), third
/// and fourth in the same lexicographic order of sorted indices (for three coordinates: 111, 112, 113, 122, 123, 133,
/// 222, 223, 233, 333 and 1111, 1112, …, 3333), the order of the JSON contract.
/// </remarks>
internal sealed class CumulantSums
{
    /// <summary>The most groups per chain.</summary>
    internal const int MaxGroups = 32;

    private readonly double[] _sums;
    private readonly long _groupLength;

    /// <param name="coordinates">1 or 3.</param>
    /// <param name="samples">Draws the chain will record (sets the group length: a multiple of 4096 draws, so lane blocks never straddle two groups).</param>
    internal CumulantSums(int coordinates, long samples)
    {
        Coordinates = coordinates;
        Size = SizeFor(coordinates);
        long perGroup = (samples + MaxGroups - 1) / MaxGroups;
        _groupLength = Math.Max(1, (perGroup + 4095) / 4096) * 4096;
        _sums = new double[MaxGroups * Size];
    }

    internal int Coordinates { get; }

    /// <summary>Sums per group: the count and the power sums of orders 1 to 4.</summary>
    internal int Size { get; }

    /// <summary>The number of sums for <paramref name="coordinates"/> coordinates (5 for one, 35 for three).</summary>
    internal static int SizeFor(int coordinates) => coordinates == 1 ? 5 : 1 + 3 + 6 + 10 + 15;

    /// <summary>The index tuples of each order for three coordinates, sorted, in the contract's order.</summary>
    internal static readonly int[][] Second = Internal.TensorIndices.Second, Third = Internal.TensorIndices.Third, Fourth = Internal.TensorIndices.Fourth;

    /// <summary>Adds a block of draws starting at recorded draw <paramref name="firstDraw"/>: its sums in the group order.</summary>
    internal void AddBlock(long firstDraw, ReadOnlySpan<double> block)
    {
        int g = (int)Math.Min(firstDraw / _groupLength, MaxGroups - 1);
        var target = _sums.AsSpan(g * Size, Size);
        for (int i = 0; i < Size; i++)
        {
            target[i] += block[i];
        }
    }

    /// <summary>Adds one draw, the <paramref name="draw"/>-th recorded, with displacement <paramref name="u"/> from the reference.</summary>
    internal void Add(long draw, ReadOnlySpan<double> u)
    {
        Span<double> block = stackalloc double[Size];
        Powers(u, block);
        AddBlock(draw, block);
    }

    /// <summary>The sums of one displacement: 1, u, and the products of orders 2 to 4 in the group order.</summary>
    internal static void Powers(ReadOnlySpan<double> u, Span<double> into)
    {
        into[0] = 1;
        if (u.Length == 1)
        {
            double x = u[0], x2 = x * x;
            (into[1], into[2], into[3], into[4]) = (x, x2, x2 * x, x2 * x2);
            return;
        }
        int k = 1;
        for (int i = 0; i < 3; i++)
        {
            into[k++] = u[i];
        }
        foreach (var t in Second)
        {
            into[k++] = u[t[0]] * u[t[1]];
        }
        foreach (var t in Third)
        {
            into[k++] = u[t[0]] * u[t[1]] * u[t[2]];
        }
        foreach (var t in Fourth)
        {
            into[k++] = u[t[0]] * u[t[1]] * u[t[2]] * u[t[3]];
        }
    }

    internal void Save(StateWriter w) => w.Doubles("CUMS", _sums);

    internal void Load(StateReader r) => r.DoublesInto("CUMS", _sums);

    /// <summary>The groups' sums (group-major).</summary>
    internal ReadOnlySpan<double> Groups => _sums;
}

/// <summary>Third and fourth cumulants of a displacement, with jackknife standard errors.</summary>
/// <param name="Third">κ3: one value (a line or radial pair) or 10 components (a site), in the contract's order.</param>
/// <param name="ThirdStandardError">Standard errors of <paramref name="Third"/>.</param>
/// <param name="Fourth">κ4: one value or 15 components.</param>
/// <param name="FourthStandardError">Standard errors of <paramref name="Fourth"/>.</param>
/// <param name="Groups">The groups of draws the jackknife used (below 8, the standard errors are not reliable and are NaN).</param>
internal sealed record CumulantEstimate(double[] Third, double[] ThirdStandardError, double[] Fourth, double[] FourthStandardError, int Groups)
{
    /// <summary>The fewest groups the jackknife needs for its errors to mean anything.</summary>
    internal const int MinimumGroups = 8;

    /// <summary>Pools every chain's groups and estimates the cumulants, with the delete-one-group jackknife for their errors.</summary>
    internal static CumulantEstimate From(IReadOnlyList<CumulantSums> chains)
    {
        int size = chains[0].Size, d = chains[0].Coordinates;
        var total = new double[size];
        var groups = new List<double[]>();
        foreach (var chain in chains)
        {
            var all = chain.Groups;
            for (int g = 0; g < CumulantSums.MaxGroups; g++)
            {
                var group = all.Slice(g * size, size);
                if (group[0] == 0)
                {
                    continue;
                }
                groups.Add(group.ToArray());
                for (int i = 0; i < size; i++)
                {
                    total[i] += group[i];
                }
            }
        }
        var (third, fourth) = Cumulants(total, d);
        var thirdSe = new double[third.Length];
        var fourthSe = new double[fourth.Length];
        int n = groups.Count;
        if (n < MinimumGroups)
        {
            Array.Fill(thirdSe, double.NaN);
            Array.Fill(fourthSe, double.NaN);
            return new CumulantEstimate(third, thirdSe, fourth, fourthSe, n);
        }
        var leaveOut = groups.Select(g => Cumulants(total.Zip(g, (t, x) => t - x).ToArray(), d)).ToList();
        Jackknife(leaveOut.Select(l => l.Third).ToList(), thirdSe);
        Jackknife(leaveOut.Select(l => l.Fourth).ToList(), fourthSe);
        return new CumulantEstimate(third, thirdSe, fourth, fourthSe, n);
    }

    private static void Jackknife(List<double[]> estimates, double[] se)
    {
        int n = estimates.Count;
        for (int c = 0; c < se.Length; c++)
        {
            double mean = estimates.Average(e => e[c]);
            se[c] = Math.Sqrt((n - 1.0) / n * estimates.Sum(e => (e[c] - mean) * (e[c] - mean)));
        }
    }

    /// <summary>κ3 and κ4 from pooled raw sums about the reference (central moments by the binomial shift to the mean).</summary>
    internal static (double[] Third, double[] Fourth) Cumulants(ReadOnlySpan<double> sums, int coordinates)
    {
        double n = sums[0];
        if (coordinates == 1)
        {
            double a = sums[1] / n, m2 = sums[2] / n, m3 = sums[3] / n, m4 = sums[4] / n;
            double c2 = m2 - a * a;
            double c3 = m3 - 3 * a * m2 + 2 * a * a * a;
            double c4 = m4 - 4 * a * m3 + 6 * a * a * m2 - 3 * a * a * a * a;
            return ([c3], [c4 - 3 * c2 * c2]);
        }
        var raw = new Dictionary<string, double>();
        int k = 1;
        for (int i = 0; i < 3; i++)
        {
            raw[Key([i])] = sums[k++] / n;
        }
        foreach (var t in CumulantSums.Second)
        {
            raw[Key(t)] = sums[k++] / n;
        }
        foreach (var t in CumulantSums.Third)
        {
            raw[Key(t)] = sums[k++] / n;
        }
        foreach (var t in CumulantSums.Fourth)
        {
            raw[Key(t)] = sums[k++] / n;
        }
        double M(params int[] idx) => idx.Length == 0 ? 1 : raw[Key(idx)];
        double A(int i) => raw[Key([i])];
        // Central moments: μ_S = Σ over subsets T of S of (−a)^(S∖T) m_T, T's raw moment (m_∅ = 1).
        double Central(int[] idx)
        {
            double sum = 0;
            int count = idx.Length;
            for (int mask = 0; mask < 1 << count; mask++)
            {
                var kept = new List<int>();
                double factor = 1;
                for (int b = 0; b < count; b++)
                {
                    if ((mask & 1 << b) != 0)
                    {
                        kept.Add(idx[b]);
                    }
                    else
                    {
                        factor *= -A(idx[b]);
                    }
                }
                sum += factor * M([.. kept]);
            }
            return sum;
        }
        var third = CumulantSums.Third.Select(Central).ToArray();
        var fourth = CumulantSums.Fourth.Select(t =>
            Central(t) - Central([t[0], t[1]]) * Central([t[2], t[3]]) - Central([t[0], t[2]]) * Central([t[1], t[3]])
                - Central([t[0], t[3]]) * Central([t[1], t[2]])).ToArray();
        return (third, fourth);
    }

    private static string Key(int[] idx)
    {
        var sorted = idx.ToArray();
        Array.Sort(sorted);
        return string.Concat(sorted);
    }
}
