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
        var groups = new List<int>(); // (chain, group) flattened as chain·MaxGroups + group, for the non-empty groups
        for (int c = 0; c < chains.Count; c++)
        {
            var all = chains[c].Groups;
            for (int g = 0; g < CumulantSums.MaxGroups; g++)
            {
                if (all[g * size] == 0)
                {
                    continue;
                }
                groups.Add(c * CumulantSums.MaxGroups + g);
                for (int i = 0; i < size; i++)
                {
                    total[i] += all[g * size + i];
                }
            }
        }
        int components3 = d == 1 ? 1 : 10, components4 = d == 1 ? 1 : 15;
        var third = new double[components3];
        var fourth = new double[components4];
        Cumulants(total, d, third, fourth);
        var thirdSe = new double[components3];
        var fourthSe = new double[components4];
        int n = groups.Count;
        if (n < MinimumGroups)
        {
            Array.Fill(thirdSe, double.NaN);
            Array.Fill(fourthSe, double.NaN);
            return new CumulantEstimate(third, thirdSe, fourth, fourthSe, n);
        }
        // Leave-one-group-out estimates, one buffer reused: the sums less the group's.
        var left = new double[size];
        var out3 = new double[n * components3];
        var out4 = new double[n * components4];
        for (int k = 0; k < n; k++)
        {
            var group = chains[groups[k] / CumulantSums.MaxGroups].Groups.Slice(groups[k] % CumulantSums.MaxGroups * size, size);
            for (int i = 0; i < size; i++)
            {
                left[i] = total[i] - group[i];
            }
            Cumulants(left, d, out3.AsSpan(k * components3, components3), out4.AsSpan(k * components4, components4));
        }
        Jackknife(out3, n, thirdSe);
        Jackknife(out4, n, fourthSe);
        return new CumulantEstimate(third, thirdSe, fourth, fourthSe, n);
    }

    private static void Jackknife(double[] estimates, int n, double[] se)
    {
        int m = se.Length;
        for (int c = 0; c < m; c++)
        {
            double mean = 0;
            for (int k = 0; k < n; k++)
            {
                mean += estimates[k * m + c];
            }
            mean /= n;
            double ss = 0;
            for (int k = 0; k < n; k++)
            {
                double e = estimates[k * m + c] - mean;
                ss += e * e;
            }
            se[c] = Math.Sqrt((n - 1.0) / n * ss);
        }
    }

    /// <summary>Where each sorted index tuple's raw sum sits in a group (three coordinates): [order][flat index of the tuple] → position.</summary>
    private static readonly int[] Raw1 = [1, 2, 3], Raw2 = Positions(2, 4), Raw3 = Positions(3, 10), Raw4 = Positions(4, 20);

    private static int[] Positions(int order, int offset)
    {
        var tuples = order == 2 ? CumulantSums.Second : order == 3 ? CumulantSums.Third : CumulantSums.Fourth;
        int count = (int)Math.Pow(3, order);
        var map = new int[count];
        for (int flat = 0; flat < count; flat++)
        {
            var idx = new int[order];
            for (int p = order - 1, f = flat; p >= 0; p--, f /= 3)
            {
                idx[p] = f % 3;
            }
            Array.Sort(idx);
            map[flat] = offset + Array.FindIndex(tuples, t => t.AsSpan().SequenceEqual(idx));
        }
        return map;
    }

    /// <summary>κ3 and κ4 from pooled raw sums about the reference (central moments by the binomial shift to the mean), into <paramref name="third"/> and <paramref name="fourth"/>.</summary>
    internal static void Cumulants(ReadOnlySpan<double> sums, int coordinates, Span<double> third, Span<double> fourth)
    {
        double n = sums[0];
        if (coordinates == 1)
        {
            double x = sums[1] / n, m2 = sums[2] / n, m3 = sums[3] / n, m4 = sums[4] / n;
            double c2 = m2 - x * x;
            third[0] = m3 - 3 * x * m2 + 2 * x * x * x;
            fourth[0] = m4 - 4 * x * m3 + 6 * x * x * m2 - 3 * x * x * x * x - 3 * c2 * c2;
            return;
        }
        Span<double> m = stackalloc double[sums.Length];
        for (int i = 0; i < m.Length; i++)
        {
            m[i] = sums[i] / n; // raw moments about the reference
        }
        for (int c = 0; c < 10; c++)
        {
            var t = CumulantSums.Third[c];
            third[c] = C3(m, t[0], t[1], t[2]);
        }
        for (int c = 0; c < 15; c++)
        {
            var t = CumulantSums.Fourth[c];
            int i = t[0], j = t[1], k = t[2], l = t[3];
            fourth[c] = C4(m, i, j, k, l) - C2(m, i, j) * C2(m, k, l) - C2(m, i, k) * C2(m, j, l) - C2(m, i, l) * C2(m, j, k);
        }

        static double A(ReadOnlySpan<double> m, int i) => m[Raw1[i]];
        static double M2(ReadOnlySpan<double> m, int i, int j) => m[Raw2[i * 3 + j]];
        static double M3(ReadOnlySpan<double> m, int i, int j, int k) => m[Raw3[(i * 3 + j) * 3 + k]];
        static double M4(ReadOnlySpan<double> m, int i, int j, int k, int l) => m[Raw4[((i * 3 + j) * 3 + k) * 3 + l]];
        static double C2(ReadOnlySpan<double> m, int i, int j) => M2(m, i, j) - A(m, i) * A(m, j);
        static double C3(ReadOnlySpan<double> m, int i, int j, int k)
            => M3(m, i, j, k) - A(m, i) * M2(m, j, k) - A(m, j) * M2(m, i, k) - A(m, k) * M2(m, i, j) + 2 * A(m, i) * A(m, j) * A(m, k);
        static double C4(ReadOnlySpan<double> m, int i, int j, int k, int l)
        {
            double ai = A(m, i), aj = A(m, j), ak = A(m, k), al = A(m, l);
            return M4(m, i, j, k, l) - ai * M3(m, j, k, l) - aj * M3(m, i, k, l) - ak * M3(m, i, j, l) - al * M3(m, i, j, k)
                + ai * aj * M2(m, k, l) + ai * ak * M2(m, j, l) + ai * al * M2(m, j, k) + aj * ak * M2(m, i, l) + aj * al * M2(m, i, k) + ak * al * M2(m, i, j)
                - 3 * ai * aj * ak * al;
        }
    }
}
