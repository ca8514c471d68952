using System.Runtime.CompilerServices;
using System;
using System.Collections.Generic;
using System.Globalization;
using System.Linq;
using MathNet.Numerics.Interpolation;
using ThermalSampling.Internal;

using ThermalSampling.Numerics;

namespace ThermalSampling.Potentials;

/// <summary>
/// A pair potential tabulated at points (r, V) and interpolated by a natural cubic spline
/// (MathNet.Numerics). Its domain is the range of the table: nothing is extrapolated.
/// </summary>
/// <remarks>
/// A cubic spline has a continuous second derivative, a piecewise-constant third derivative and a
/// zero fourth derivative. This type reports V‴ as the central difference of the spline's V″ over
/// one table spacing and V⁗ as the second difference of V″ over one spacing, so first-order
/// anharmonic corrections computed from a table are only as good as the table's resolution.
/// </remarks>
public readonly struct TabulatedPotential : IPairPotential
{
    /// <summary>The fewest points accepted.</summary>
    public const int MinimumPointCount = 5;

    private readonly CubicSpline _spline;
    private readonly double _lower;
    private readonly double _upper;
    private readonly double[] _knots;
    private readonly PotentialWell? _well;

    /// <summary>Builds a tabulated potential.</summary>
    /// <param name="separationsAngstrom">r values in Å, strictly increasing, finite, at least 0, at least <see cref="MinimumPointCount"/> of them.</param>
    /// <param name="energiesElectronVolt">V values in eV, finite, one per separation.</param>
    public TabulatedPotential(IReadOnlyList<double> separationsAngstrom, IReadOnlyList<double> energiesElectronVolt)
    {
        Preconditions.CheckNotNull(separationsAngstrom, nameof(separationsAngstrom));
        Preconditions.CheckNotNull(energiesElectronVolt, nameof(energiesElectronVolt));
        if (separationsAngstrom.Count != energiesElectronVolt.Count)
        {
            throw new ArgumentException(string.Create(CultureInfo.InvariantCulture,
                $"energiesElectronVolt has {energiesElectronVolt.Count} values but separationsAngstrom has {separationsAngstrom.Count}; they must have the same length."),
                nameof(energiesElectronVolt));
        }
        if (separationsAngstrom.Count < MinimumPointCount)
        {
            throw new ArgumentException(string.Create(CultureInfo.InvariantCulture,
                $"separationsAngstrom has {separationsAngstrom.Count} points; a tabulated potential needs at least {MinimumPointCount}."),
                nameof(separationsAngstrom));
        }
        double[] r = separationsAngstrom.ToArray();
        double[] v = energiesElectronVolt.ToArray();
        for (int i = 0; i < r.Length; i++)
        {
            Preconditions.CheckNonNegative(r[i], $"{nameof(separationsAngstrom)}[{i}]");
            Preconditions.CheckFinite(v[i], $"{nameof(energiesElectronVolt)}[{i}]");
            if (i > 0 && !(r[i] > r[i - 1]))
            {
                throw new ArgumentException(string.Create(CultureInfo.InvariantCulture,
                    $"separationsAngstrom[{i}] = {r[i]:R} is not greater than separationsAngstrom[{i - 1}] = {r[i - 1]:R}; separations must be strictly increasing (no duplicates, sorted)."),
                    nameof(separationsAngstrom));
            }
        }
        _spline = CubicSpline.InterpolateNaturalSorted(r, v);
        _lower = r[0];
        _upper = r[^1];
        _knots = r;
        var spline = _spline;
        double? r0 = WellLocator.FindLowestMinimum(spline.Interpolate, spline.Differentiate, _lower, _upper, 20 * r.Length);
        _well = r0 is double rm ? new PotentialWell(rm, spline.Interpolate(rm), v[^1] - spline.Interpolate(rm)) : null;
    }

    /// <inheritdoc/>
    public double DomainLower => _lower;

    /// <inheritdoc/>
    public double DomainUpper => _upper;

    /// <inheritdoc/>
    public PotentialWell? Well => _well;

    /// <inheritdoc/>
    public string Description => string.Create(CultureInfo.InvariantCulture,
        $"tabulated potential ({_knots.Length} points on [{_lower:G6}, {_upper:G6}] Å, natural cubic spline)");

    /// <inheritdoc/>
    public double Energy(double r) => _spline.Interpolate(r);

    /// <inheritdoc/>
    public double EnergyAtSquaredDistance(double squaredDistance) => _spline.Interpolate(Math.Sqrt(squaredDistance));

    /// <inheritdoc/>
    public PairDerivatives Derivatives(double r)
    {
        // V″ of a cubic spline is piecewise linear with kinks at the knots, so V‴ and V⁗ come from differences of V″
        // over a stencil that spans at least one whole cell on each side: the widest of the cell holding r and its
        // neighbours. (Half a cell, as before, gave V⁗ = 0 mid-cell and 2V⁗ at a knot.)
        int cell = Math.Clamp(Array.BinarySearch(_knots, r) is int k && k >= 0 ? k : ~k - 1, 0, _knots.Length - 2);
        double h = 0;
        for (int c = Math.Max(cell - 1, 0); c <= Math.Min(cell + 1, _knots.Length - 2); c++)
        {
            h = Math.Max(h, _knots[c + 1] - _knots[c]);
        }
        double lo = Math.Max(_lower, r - h), hi = Math.Min(_upper, r + h);
        double mid = 0.5 * (lo + hi);
        double half = 0.5 * (hi - lo);
        double d2Lo = _spline.Differentiate2(lo), d2Hi = _spline.Differentiate2(hi), d2Mid = _spline.Differentiate2(mid);
        return new PairDerivatives(
            _spline.Interpolate(r),
            _spline.Differentiate(r),
            _spline.Differentiate2(r),
            (d2Hi - d2Lo) / (hi - lo),
            (d2Hi - 2 * d2Mid + d2Lo) / (half * half));
    }

    /// <inheritdoc/>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public TD LaneEnergy<TOps, TD, TB>(TD r)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
        => LaneForms.ByLane<TOps, TD, TB, TabulatedPotential>(this, r);

    /// <inheritdoc/>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public TD LaneEnergyAtSquaredDistance<TOps, TD, TB>(TD squaredDistance)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
        => LaneForms.ByLaneAtSquaredDistance<TOps, TD, TB, TabulatedPotential>(this, squaredDistance);
}
