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
    private readonly TPotential[] _groupPotentials;
    private readonly int[] _groupEnds;
    private readonly PolynomialField? _field;
    private readonly double _cx, _cy, _cz, _beta;
    private readonly Confinement _confinement;
    private readonly string _description;

    internal SiteWeight(SiteLandscape<TPotential> landscape, double beta)
    {
        _potential = landscape.Potential;
        _sites = landscape.PackedCoordinates.ToArray();
        (_groupPotentials, _groupEnds) = landscape.KernelGroups();
        _field = landscape.Field;
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
        int i = 0;
        for (int g = 0; g < _groupEnds.Length; g++)
        {
            var potential = _groupPotentials[g];
            for (int end = _groupEnds[g]; i < end; i += 3)
            {
                double dx = x - s[i], dy = y - s[i + 1], dz = z - s[i + 2];
                e += potential.EnergyAtSquaredDistance(dx * dx + dy * dy + dz * dz);
            }
        }
        if (_field is not null)
        {
            e += _field.Value(new Position(x, y, z));
        }
        if (double.IsNaN(e) || double.IsNegativeInfinity(e))
        {
            throw new NonFiniteEnergyException(SitePairs.OffendingSeparation(_groupPotentials, _groupEnds, _sites, x, y, z), e, _description);
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
    internal static double OffendingSeparation<TPotential>(TPotential[] potentials, int[] ends, double[] sites, double x, double y, double z)
        where TPotential : struct, IPairPotential
    {
        double firstInfinite = double.NaN;
        for (int i = 0, g = 0; i < sites.Length; i += 3)
        {
            while (i >= ends[g])
            {
                g++;
            }
            double dx = x - sites[i], dy = y - sites[i + 1], dz = z - sites[i + 2], r2 = dx * dx + dy * dy + dz * dz;
            double pair = potentials[g].EnergyAtSquaredDistance(r2);
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
