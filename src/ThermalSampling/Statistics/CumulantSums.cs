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
/// 222, 223, 233, 333 and 1111, 1112, …, 3333), the order of the JSON contract; then, per scattering vector q,
/// Σ cos(q·u) and Σ sin(q·u) (the generalised temperature factor's sums).
/// </remarks>
internal sealed class CumulantSums
{
    /// <summary>The most groups per chain.</summary>
    internal const int MaxGroups = 32;

    private readonly double[] _sums;
    private readonly double[] _waves;
    private readonly long _groupLength;

    /// <param name="coordinates">1 or 3.</param>
    /// <param name="samples">Draws the chain will record (sets the group length: a multiple of 4096 draws, so lane blocks never straddle two groups).</param>
    /// <param name="waves">Scattering vectors, <paramref name="coordinates"/> components each, Å⁻¹.</param>
    internal CumulantSums(int coordinates, long samples, double[] waves)
    {
        Coordinates = coordinates;
        _waves = waves;
        WaveCount = waves.Length / coordinates;
        Size = SizeFor(coordinates) + 2 * WaveCount;
        long perGroup = (samples + MaxGroups - 1) / MaxGroups;
        _groupLength = Math.Max(1, (perGroup + 4095) / 4096) * 4096;
        _sums = new double[MaxGroups * Size];
    }

    internal int Coordinates { get; }

    /// <summary>Scattering vectors whose sums follow the power sums.</summary>
    internal int WaveCount { get; }

    /// <summary>The scattering vectors, Å⁻¹.</summary>
    internal ReadOnlySpan<double> Waves => _waves;

    /// <summary>Sums per group: the count, the power sums of orders 1 to 4, and two per scattering vector.</summary>
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
        int at = SizeFor(Coordinates);
        for (int k = 0; k < WaveCount; k++)
        {
            double phase = 0;
            for (int i = 0; i < u.Length; i++)
            {
                phase += _waves[k * u.Length + i] * u[i];
            }
            (block[at + 2 * k + 1], block[at + 2 * k]) = Math.SinCos(phase);
        }
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

    /// <summary>
    /// Pools every chain's groups and estimates the cumulants, with the delete-one-group jackknife for their errors;
    /// <paramref name="map"/>, when given, is applied to every estimate's third and fourth components (a linear map such as
    /// a symmetry average, so that the errors are those of the mapped values).
    /// </summary>
    internal static CumulantEstimate From(IReadOnlyList<CumulantSums> chains, Func<double[], double[]>? map = null)
    {
        int d = chains[0].Coordinates;
        int components3 = d == 1 ? 1 : 10, components4 = d == 1 ? 1 : 15;
        var (values, errors, groups) = GroupJackknife.Run(chains, components3 + components4, (sums, into) =>
        {
            Cumulants(sums, d, into[..components3], into[components3..]);
            if (map is not null)
            {
                map(into[..components3].ToArray()).CopyTo(into);
                map(into[components3..].ToArray()).CopyTo(into[components3..]);
            }
        });
        return new CumulantEstimate(values[..components3], errors[..components3], values[components3..], errors[components3..], groups);
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

/// <summary>
/// The delete-one-group jackknife over the groups of draws of every chain (<see cref="CumulantSums"/>): an estimator of
/// the pooled sums applied to all of them and to each leave-one-group-out total.
/// </summary>
internal static class GroupJackknife
{
    /// <summary>An estimator: the pooled sums of one group layout in, its outputs out.</summary>
    internal delegate void Estimator(ReadOnlySpan<double> sums, Span<double> into);

    /// <summary>The estimates from every chain's pooled groups and their jackknife standard errors (NaN with fewer than
    /// <see cref="CumulantEstimate.MinimumGroups"/> non-empty groups), and the number of groups.</summary>
    internal static (double[] Values, double[] StandardErrors, int Groups) Run(IReadOnlyList<CumulantSums> chains, int outputs, Estimator estimate)
    {
        int size = chains[0].Size;
        return Run(chains.Count, CumulantSums.MaxGroups, size, (c, g) => chains[c].Groups.Slice(g * size, size), outputs, estimate);
    }

    /// <summary>Group <paramref name="group"/> of chain <paramref name="chain"/>: its sums, the draws first.</summary>
    internal delegate ReadOnlySpan<double> GroupSums(int chain, int group);

    /// <summary>
    /// The same over any layout of sums: <paramref name="chains"/> chains of <paramref name="groupsPerChain"/> groups of
    /// <paramref name="size"/> sums each (the first being the group's draws; empty groups are left out).
    /// </summary>
    internal static (double[] Values, double[] StandardErrors, int Groups) Run(int chains, int groupsPerChain, int size, GroupSums sumsOf, int outputs, Estimator estimate)
    {
        var total = new double[size];
        var groups = new List<int>(); // (chain, group) flattened as chain·groupsPerChain + group, for the non-empty groups
        for (int c = 0; c < chains; c++)
        {
            for (int g = 0; g < groupsPerChain; g++)
            {
                var sums = sumsOf(c, g);
                if (sums[0] == 0)
                {
                    continue;
                }
                groups.Add(c * groupsPerChain + g);
                for (int i = 0; i < size; i++)
                {
                    total[i] += sums[i];
                }
            }
        }
        var values = new double[outputs];
        estimate(total, values);
        var errors = new double[outputs];
        int n = groups.Count;
        if (n < CumulantEstimate.MinimumGroups)
        {
            Array.Fill(errors, double.NaN);
            return (values, errors, n);
        }
        // Leave-one-group-out estimates, one buffer reused: the sums less the group's.
        var left = new double[size];
        var estimates = new double[n * outputs];
        for (int k = 0; k < n; k++)
        {
            var group = sumsOf(groups[k] / groupsPerChain, groups[k] % groupsPerChain);
            for (int i = 0; i < size; i++)
            {
                left[i] = total[i] - group[i];
            }
            estimate(left, estimates.AsSpan(k * outputs, outputs));
        }
        for (int c = 0; c < outputs; c++)
        {
            double mean = 0;
            for (int k = 0; k < n; k++)
            {
                mean += estimates[k * outputs + c];
            }
            mean /= n;
            double ss = 0;
            for (int k = 0; k < n; k++)
            {
                double e = estimates[k * outputs + c] - mean;
                ss += e * e;
            }
            errors[c] = Math.Sqrt((n - 1.0) / n * ss);
        }
        return (values, errors, n);
    }
}

/// <summary>
/// The generalised temperature factor T(q) = ⟨exp(iq·(x − ⟨x⟩))⟩ at every recorded scattering vector, from the groups'
/// Σ exp(iq·u) about the reference turned to the mean: T = e^(−iq·ū)·⟨e^(iq·u)⟩, exact for any reference. Beside it the
/// Gaussian with the sampled covariance, exp(−½ qᵀUq), and their difference, all with jackknife standard errors.
/// </summary>
/// <param name="Real">Re T per q.</param>
/// <param name="RealStandardError">Standard errors of <paramref name="Real"/>.</param>
/// <param name="Imaginary">Im T per q.</param>
/// <param name="ImaginaryStandardError">Standard errors of <paramref name="Imaginary"/>.</param>
/// <param name="Gaussian">exp(−½ qᵀUq) with U the sampled covariance, per q.</param>
/// <param name="Departure">Re T − <paramref name="Gaussian"/> per q.</param>
/// <param name="DepartureStandardError">Standard errors of <paramref name="Departure"/> (the jackknife of the difference, so correlations count).</param>
internal sealed record TemperatureFactorEstimate(double[] Real, double[] RealStandardError, double[] Imaginary, double[] ImaginaryStandardError,
    double[] Gaussian, double[] Departure, double[] DepartureStandardError)
{
    /// <summary>Pools every chain's groups; nothing when no scattering vector was recorded.</summary>
    internal static TemperatureFactorEstimate? From(IReadOnlyList<CumulantSums> chains)
    {
        var first = chains[0];
        int waves = first.WaveCount, d = first.Coordinates, at = CumulantSums.SizeFor(d);
        if (waves == 0)
        {
            return null;
        }
        var q = first.Waves.ToArray();
        var (values, errors, _) = GroupJackknife.Run(chains, 4 * waves, (sums, into) =>
        {
            double n = sums[0];
            Span<double> mean = stackalloc double[d];
            for (int i = 0; i < d; i++)
            {
                mean[i] = sums[1 + i] / n;
            }
            for (int k = 0; k < waves; k++)
            {
                var qk = q.AsSpan(k * d, d);
                double phase = 0, quadratic;
                for (int i = 0; i < d; i++)
                {
                    phase += qk[i] * mean[i];
                }
                if (d == 1)
                {
                    quadratic = qk[0] * qk[0] * (sums[2] / n - mean[0] * mean[0]);
                }
                else
                {
                    // Second-order sums in the order xx, xy, xz, yy, yz, zz after the count and the first order.
                    double cxx = sums[4] / n - mean[0] * mean[0], cxy = sums[5] / n - mean[0] * mean[1], cxz = sums[6] / n - mean[0] * mean[2];
                    double cyy = sums[7] / n - mean[1] * mean[1], cyz = sums[8] / n - mean[1] * mean[2], czz = sums[9] / n - mean[2] * mean[2];
                    quadratic = qk[0] * qk[0] * cxx + qk[1] * qk[1] * cyy + qk[2] * qk[2] * czz + 2 * (qk[0] * qk[1] * cxy + qk[0] * qk[2] * cxz + qk[1] * qk[2] * cyz);
                }
                double c = sums[at + 2 * k] / n, s = sums[at + 2 * k + 1] / n;
                var (sinPhase, cosPhase) = Math.SinCos(phase);
                double re = c * cosPhase + s * sinPhase, gaussian = Math.Exp(-0.5 * quadratic);
                into[4 * k] = re;
                into[4 * k + 1] = s * cosPhase - c * sinPhase;
                into[4 * k + 2] = gaussian;
                into[4 * k + 3] = re - gaussian;
            }
        });
        double[] Pick(double[] from, int offset) => Enumerable.Range(0, waves).Select(k => from[4 * k + offset]).ToArray();
        return new TemperatureFactorEstimate(Pick(values, 0), Pick(errors, 0), Pick(values, 1), Pick(errors, 1), Pick(values, 2), Pick(values, 3), Pick(errors, 3));
    }
}
