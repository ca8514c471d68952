using System;
using System.Runtime.CompilerServices;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Randomness;

namespace ThermalSampling.Sampling;

/// <summary>The state of a 3D chain: the position and its log Boltzmann weight −E/kT.</summary>
/// <param name="X">x, Å.</param>
/// <param name="Y">y, Å.</param>
/// <param name="Z">z, Å.</param>
/// <param name="LogWeight">−E(x)/kT.</param>
public readonly record struct SiteChainState(double X, double Y, double Z, double LogWeight);

/// <summary>
/// One random-walk Metropolis step for a particle among fixed sites: propose x' = x + s·L·ξ with ξ standard normal and
/// L a fixed 3×3 lower-triangular shape (the Cholesky factor of the harmonic covariance, so the proposal follows the
/// well's anisotropy), reject outside the confinement, accept with probability min(1, e^(−ΔE/kT)).
/// </summary>
/// <typeparam name="TPotential">The potential, a struct so that the energy call inlines.</typeparam>
public readonly struct SiteMetropolisKernel<TPotential> where TPotential : struct, IPairPotential
{
    private readonly TPotential _potential;
    private readonly double[] _sites;
    private readonly double _cx, _cy, _cz, _beta;
    private readonly Confinement _confinement;
    private readonly double _l00, _l10, _l11, _l20, _l21, _l22;
    private readonly string _description;

    /// <summary>Creates the kernel.</summary>
    /// <param name="landscape">The landscape.</param>
    /// <param name="beta">1/kT, 1/eV.</param>
    /// <param name="shape">The proposal shape, a lower-triangular matrix given row by row as (L00, L10, L11, L20, L21, L22), Å.</param>
    public SiteMetropolisKernel(SiteLandscape<TPotential> landscape, double beta, (double L00, double L10, double L11, double L20, double L21, double L22) shape)
    {
        Internal.Preconditions.CheckNotNull(landscape, nameof(landscape));
        _potential = landscape.Potential;
        _sites = landscape.PackedCoordinates.ToArray();
        _cx = landscape.Centre.X;
        _cy = landscape.Centre.Y;
        _cz = landscape.Centre.Z;
        _confinement = landscape.Confinement;
        _beta = beta;
        (_l00, _l10, _l11, _l20, _l21, _l22) = shape;
        _description = landscape.Potential.Description;
    }

    /// <summary>−E/kT at (x, y, z), or −∞ outside the confinement.</summary>
    /// <param name="x">x, Å.</param>
    /// <param name="y">y, Å.</param>
    /// <param name="z">z, Å.</param>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public double LogWeight(double x, double y, double z)
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
            throw new NonFiniteEnergyException(Math.Sqrt(x * x + y * y + z * z), e, _description);
        }
        return -_beta * e;
    }

    /// <summary>The state at a position.</summary>
    /// <param name="position">The position, Å, inside the confinement.</param>
    public SiteChainState StateAt(Position position) => new(position.X, position.Y, position.Z, LogWeight(position.X, position.Y, position.Z));

    /// <summary>One step with scale <paramref name="scale"/> applied to the proposal shape.</summary>
    /// <param name="state">The current state.</param>
    /// <param name="scale">The adaptive scale s.</param>
    /// <param name="random">The chain's random stream.</param>
    /// <param name="accepted">Whether the proposal was accepted.</param>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public SiteChainState Step(in SiteChainState state, double scale, ref RandomStream random, out bool accepted)
    {
        double a = random.NextStandardNormal(), b = random.NextStandardNormal(), c = random.NextStandardNormal();
        double x = state.X + scale * _l00 * a;
        double y = state.Y + scale * (_l10 * a + _l11 * b);
        double z = state.Z + scale * (_l20 * a + _l21 * b + _l22 * c);
        double lw = LogWeight(x, y, z);
        double delta = lw - state.LogWeight;
        accepted = delta >= 0 || random.NextUnitInterval() < Math.Exp(delta);
        return accepted ? new SiteChainState(x, y, z, lw) : state;
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
