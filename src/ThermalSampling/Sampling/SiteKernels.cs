using System;
using System.Runtime.CompilerServices;
using ThermalSampling.Persistence;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;

namespace ThermalSampling.Sampling;

/// <summary>
/// The log Boltzmann weight −E/kT of a particle among fixed sites, −∞ outside the confinement: the direct sampler's
/// target and envelope bound (the Metropolis chains use the lane kernels in <see cref="SiteLaneChains"/>).
/// </summary>
/// <typeparam name="TPotential">The potential, a struct so that the energy call inlines.</typeparam>
internal readonly struct SiteWeight<TPotential> where TPotential : struct, IPairPotential
{
    private readonly TPotential _potential;
    private readonly double[] _sites;
    private readonly double _cx, _cy, _cz, _beta;
    private readonly Confinement _confinement;
    private readonly string _description;

    internal SiteWeight(SiteLandscape<TPotential> landscape, double beta)
    {
        _potential = landscape.Potential;
        _sites = landscape.PackedCoordinates.ToArray();
        _cx = landscape.Centre.X;
        _cy = landscape.Centre.Y;
        _cz = landscape.Centre.Z;
        _confinement = landscape.Confinement;
        _beta = beta;
        _description = landscape.Potential.Description;
    }

    /// <summary>The log weight at (x, y, z), Å; throws <see cref="NonFiniteEnergyException"/> for a NaN or −∞ energy, naming the separation of the pair that caused it.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal double LogWeight(double x, double y, double z)
    {
        if (!_confinement.Contains(x - _cx, y - _cy, z - _cz))
        {
            return double.NegativeInfinity;
        }
        double e = 0;
        var s = _sites;
        for (int i = 0; i < s.Length; i += 3)
        {
            double dx = x - s[i], dy = y - s[i + 1], dz = z - s[i + 2];
            e += _potential.EnergyAtSquaredDistance(dx * dx + dy * dy + dz * dz);
        }
        if (double.IsNaN(e) || double.IsNegativeInfinity(e))
        {
            throw new NonFiniteEnergyException(SitePairs.OffendingSeparation(_potential, _sites, x, y, z), e, _description);
        }
        return -_beta * e;
    }
}

/// <summary>Pair bookkeeping shared by the direct and the vector-lane site kernels, used only on their error paths.</summary>
internal static class SitePairs
{
    /// <summary>
    /// The separation of the pair that made the energy at (x, y, z) NaN or −∞: the first pair whose own energy is NaN or
    /// −∞, or else the first infinite one (a sum of +∞ and −∞ from two pairs); NaN when no pair's energy there is
    /// non-finite.
    /// </summary>
    internal static double OffendingSeparation<TPotential>(in TPotential potential, double[] sites, double x, double y, double z)
        where TPotential : struct, IPairPotential
    {
        double firstInfinite = double.NaN;
        for (int i = 0; i < sites.Length; i += 3)
        {
            double dx = x - sites[i], dy = y - sites[i + 1], dz = z - sites[i + 2], r2 = dx * dx + dy * dy + dz * dz;
            double pair = potential.EnergyAtSquaredDistance(r2);
            if (double.IsNaN(pair) || double.IsNegativeInfinity(pair))
            {
                return Math.Sqrt(r2);
            }
            if (double.IsInfinity(pair) && double.IsNaN(firstInfinite))
            {
                firstInfinite = Math.Sqrt(r2);
            }
        }
        return firstInfinite;
    }
}

/// <summary>Mergeable running mean vector and co-moment matrix of 3D positions (Chan et al. 1979 pairwise update).</summary>
internal struct CovarianceAccumulator
{
    internal long Count;
    internal double MeanX, MeanY, MeanZ;
    internal double Cxx, Cyy, Czz, Cxy, Cxz, Cyz;

    internal void Add(double x, double y, double z)
    {
        Count++;
        double dx = x - MeanX, dy = y - MeanY, dz = z - MeanZ;
        double inv = 1.0 / Count;
        MeanX += dx * inv;
        MeanY += dy * inv;
        MeanZ += dz * inv;
        double ex = x - MeanX, ey = y - MeanY, ez = z - MeanZ;
        Cxx += dx * ex;
        Cyy += dy * ey;
        Czz += dz * ez;
        Cxy += dx * ey;
        Cxz += dx * ez;
        Cyz += dy * ez;
    }

    /// <summary>A block of n positions from its raw sums about a reference point: Σd, Σd² and Σ of the cross products of d = p − ref.</summary>
    internal static CovarianceAccumulator FromRawSums(long n, double refX, double refY, double refZ, double sx, double sy, double sz,
        double sxx, double syy, double szz, double sxy, double sxz, double syz)
    {
        double mx = sx / n, my = sy / n, mz = sz / n;
        return new CovarianceAccumulator
        {
            Count = n,
            MeanX = refX + mx,
            MeanY = refY + my,
            MeanZ = refZ + mz,
            Cxx = Math.Max(sxx - sx * mx, 0),
            Cyy = Math.Max(syy - sy * my, 0),
            Czz = Math.Max(szz - sz * mz, 0),
            Cxy = sxy - sx * my,
            Cxz = sxz - sx * mz,
            Cyz = syz - sy * mz,
        };
    }

    internal readonly void Save(StateWriter w)
    {
        w.Longs("COVN", [Count]);
        w.Doubles("COVS", [MeanX, MeanY, MeanZ, Cxx, Cyy, Czz, Cxy, Cxz, Cyz]);
    }

    internal static CovarianceAccumulator Load(StateReader r)
    {
        long n = r.InRange(r.Longs("COVN", 1)[0], 0, long.MaxValue, "the covariance count");
        var v = r.Doubles("COVS", 9);
        return new CovarianceAccumulator { Count = n, MeanX = v[0], MeanY = v[1], MeanZ = v[2], Cxx = v[3], Cyy = v[4], Czz = v[5], Cxy = v[6], Cxz = v[7], Cyz = v[8] };
    }

    internal static CovarianceAccumulator Merge(in CovarianceAccumulator a, in CovarianceAccumulator b)
    {
        if (a.Count == 0)
        {
            return b;
        }
        if (b.Count == 0)
        {
            return a;
        }
        double na = a.Count, nb = b.Count, n = na + nb, f = na * nb / n;
        double dx = b.MeanX - a.MeanX, dy = b.MeanY - a.MeanY, dz = b.MeanZ - a.MeanZ;
        return new CovarianceAccumulator
        {
            Count = a.Count + b.Count,
            MeanX = a.MeanX + dx * nb / n,
            MeanY = a.MeanY + dy * nb / n,
            MeanZ = a.MeanZ + dz * nb / n,
            Cxx = a.Cxx + b.Cxx + dx * dx * f,
            Cyy = a.Cyy + b.Cyy + dy * dy * f,
            Czz = a.Czz + b.Czz + dz * dz * f,
            Cxy = a.Cxy + b.Cxy + dx * dy * f,
            Cxz = a.Cxz + b.Cxz + dx * dz * f,
            Cyz = a.Cyz + b.Cyz + dy * dz * f,
        };
    }

    internal readonly Analysis.SymmetricTensor Covariance()
    {
        double d = Count > 1 ? Count - 1 : 1;
        return new Analysis.SymmetricTensor(Cxx / d, Cyy / d, Czz / d, Cxy / d, Cxz / d, Cyz / d);
    }
}
