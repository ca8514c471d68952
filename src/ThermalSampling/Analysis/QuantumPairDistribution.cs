using System;
using System.Collections.Immutable;
using System.Globalization;
using System.Linq;
using MathNet.Numerics.LinearAlgebra;
using MathNet.Numerics.LinearAlgebra.Factorization;
using ThermalSampling.Internal;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Units;

namespace ThermalSampling.Analysis;

/// <summary>
/// The exact quantum thermal distribution of a pair's separation in its window, with hard walls at the window ends: the
/// Hamiltonian on a grid (the discrete variable representation of Colbert &amp; Miller, J. Chem. Phys. 96, 1982 (1992),
/// in its finite-interval form, which makes the wave function vanish at both walls exactly), diagonalised with MathNet;
/// the thermal density ρ(x) = Σ e^(−βE_n)|ψ_n(x)|²/Z and its moments. A radial landscape is the three-dimensional
/// relative coordinate of the pair: the radial problems for angular momentum l = 0, 1, … (centrifugal term
/// ħ²l(l + 1)/(2mr²), weight 2l + 1) are summed until the omitted ones cannot change the result at the requested
/// precision. The grid is refined until the mean and variance no longer change at that precision; both checks are
/// reported (<see cref="GridPoints"/>, <see cref="GridChange"/>, <see cref="AngularMomenta"/>, <see cref="Converged"/>).
/// </summary>
public sealed class QuantumPairDistribution
{
    private const double HardCore = 1e4; // eV: a grid point inside a hard core (+∞) is a wall this high
    private const int MaxGridPoints = 3000;

    private QuantumPairDistribution(ImmutableArray<double> grid, ImmutableArray<double> probabilities, ImmutableArray<double> levels, int bound,
        double escapeWeight, int momenta, double gridChange, bool converged, double kelvin)
    {
        Grid = grid;
        Probabilities = probabilities;
        LevelsInElectronVolts = levels;
        BoundLevels = bound;
        ShareAboveEscape = escapeWeight;
        AngularMomenta = momenta;
        GridChange = gridChange;
        Converged = converged;
        TemperatureInKelvin = kelvin;
        double mean = 0;
        for (int i = 0; i < grid.Length; i++)
        {
            mean += probabilities[i] * grid[i];
        }
        double m2 = 0, m3 = 0, m4 = 0;
        for (int i = 0; i < grid.Length; i++)
        {
            double d = grid[i] - mean, d2 = d * d;
            m2 += probabilities[i] * d2;
            m3 += probabilities[i] * d2 * d;
            m4 += probabilities[i] * d2 * d2;
        }
        MeanInAngstroms = mean;
        VarianceInAngstromsSquared = m2;
        Skewness = m3 / Math.Pow(m2, 1.5);
        ExcessKurtosis = m4 / (m2 * m2) - 3;
    }

    /// <summary>The grid's interior points, Å (the walls are the window ends).</summary>
    public ImmutableArray<double> Grid { get; }

    /// <summary>The thermal probability at each grid point (they sum to 1; divide by the spacing for a density).</summary>
    public ImmutableArray<double> Probabilities { get; }

    /// <summary>The lowest energy levels (for a radial landscape, those of l = 0), eV, ascending; at most 50.</summary>
    public ImmutableArray<double> LevelsInElectronVolts { get; }

    /// <summary>The levels (l = 0 for radial) below the escape energy, the lower of the potential at the two walls: the
    /// states the well binds rather than the walls.</summary>
    public int BoundLevels { get; }

    /// <summary>The thermal weight of states at or above the escape energy: the share of the particle held by the walls, not the well.</summary>
    public double ShareAboveEscape { get; }

    /// <summary>The angular momenta summed (1 for a line: only l = 0 exists).</summary>
    public int AngularMomenta { get; }

    /// <summary>Grid points used.</summary>
    public int GridPoints => Grid.Length;

    /// <summary>The largest change of the mean (in units of the spread) or of the variance (relative) between the last two grids.</summary>
    public double GridChange { get; }

    /// <summary>Whether the grid (and the l sum) converged to the requested precision.</summary>
    public bool Converged { get; }

    /// <summary>The temperature, K.</summary>
    public double TemperatureInKelvin { get; }

    /// <summary>⟨x⟩, Å.</summary>
    public double MeanInAngstroms { get; }

    /// <summary>⟨(x − ⟨x⟩)²⟩, Å².</summary>
    public double VarianceInAngstromsSquared { get; }

    /// <summary>The RMS spread √variance, Å.</summary>
    public double RmsInAngstroms => Math.Sqrt(VarianceInAngstromsSquared);

    /// <summary>The third standardised moment.</summary>
    public double Skewness { get; }

    /// <summary>The fourth standardised moment less 3.</summary>
    public double ExcessKurtosis { get; }

    /// <summary>The exact quantum thermal distribution of <paramref name="landscape"/>'s separation.</summary>
    /// <typeparam name="TPotential">The potential type.</typeparam>
    /// <param name="landscape">The landscape: its window's ends are hard walls.</param>
    /// <param name="mass">The (reduced) mass of the relative motion.</param>
    /// <param name="temperature">The temperature; above 0 K.</param>
    /// <param name="precision">The relative precision of the mean (in units of the spread) and of the variance, 1e-12 to 1e-2.</param>
    /// <param name="gridPoints">A fixed grid of this many interior points (10 to 3000) instead of the refinement; null refines.</param>
    /// <exception cref="ArgumentOutOfRangeException">A precision or grid outside its range.</exception>
    public static QuantumPairDistribution Compute<TPotential>(PairLandscape<TPotential> landscape, Mass mass, Temperature temperature, double precision = 1e-6,
        int? gridPoints = null)
        where TPotential : struct, IPairPotential
    {
        Preconditions.CheckNotNull(landscape, nameof(landscape));
        if (!(precision >= 1e-12 && precision <= 1e-2))
        {
            throw new ArgumentOutOfRangeException(nameof(precision), precision, "The precision must lie between 1e-12 and 1e-2.");
        }
        if (gridPoints is int fixedPoints && fixedPoints is < 10 or > MaxGridPoints)
        {
            throw new ArgumentOutOfRangeException(nameof(gridPoints), fixedPoints, $"The grid must have 10 to {MaxGridPoints} points.");
        }
        double kT = temperature.ThermalEnergyInElectronVolts;
        double hbar2Over2m = PhysicalConstants.HbarSquaredOverAtomicMassElectronVoltAngstromSquared / (2 * mass.InAtomicMassUnits);
        if (gridPoints is int n)
        {
            return Solve(landscape, hbar2Over2m, kT, n, precision, temperature.InKelvin);
        }
        // Start where the shortest wavelength that matters, that of a particle 40 kT plus 20 zero-point quanta above the
        // well's bottom, has one point; refine by 1.4× until the mean and variance hold still (on a window whose walls
        // are smooth the grid converges exponentially, so the change between two grids bounds the error).
        double zeroPoint = 0;
        if (landscape.Potential.Well is { } well && landscape.Contains(well.EquilibriumDistanceInAngstroms))
        {
            double k = landscape.Potential.Derivatives(well.EquilibriumDistanceInAngstroms).Second;
            zeroPoint = k > 0 ? Math.Sqrt(2 * hbar2Over2m * k) : 0; // ħω = √(ħ²k/m)
        }
        double energy = 40 * kT + 20 * zeroPoint;
        double wavelength = 2 * Math.PI * Math.Sqrt(hbar2Over2m / energy);
        int points = Math.Clamp((int)Math.Ceiling(landscape.WindowWidthInAngstroms / wavelength), 24, MaxGridPoints);
        // A radial landscape refines on its l = 0 problem alone (a diagonalisation per grid, not one per l), then sums over
        // l on the last two grids and reports the change of the full answer between them.
        bool radial = landscape.Geometry == SeparationGeometry.Radial;
        QuantumPairDistribution? previous = null;
        int previousPoints = 0;
        while (true)
        {
            var current = Solve(landscape, hbar2Over2m, kT, points, precision, temperature.InKelvin, lZeroOnly: radial);
            if (previous is not null)
            {
                double change = Change(current, previous);
                if ((change <= precision && current.Converged) || points == MaxGridPoints)
                {
                    if (radial)
                    {
                        current = Solve(landscape, hbar2Over2m, kT, points, precision, temperature.InKelvin);
                        change = Math.Max(change, Change(current, Solve(landscape, hbar2Over2m, kT, previousPoints, precision, temperature.InKelvin)));
                    }
                    return current.WithGridCheck(change, change <= precision);
                }
            }
            previous = current;
            previousPoints = points;
            points = Math.Min((int)Math.Ceiling(points * 1.4), MaxGridPoints);
        }
    }

    /// <summary>The change of the mean (in units of the spread) or of the variance (relative) between two grids' answers.</summary>
    private static double Change(QuantumPairDistribution current, QuantumPairDistribution previous)
        => Math.Max(Math.Abs(current.MeanInAngstroms - previous.MeanInAngstroms) / current.RmsInAngstroms,
            Math.Abs(current.VarianceInAngstromsSquared / previous.VarianceInAngstromsSquared - 1));

    /// <summary>One grid of <paramref name="n"/> interior points: the l = 0 problem, and for a radial landscape the l sum.</summary>
    private static QuantumPairDistribution Solve<TPotential>(PairLandscape<TPotential> landscape, double hbar2Over2m, double kT, int n, double precision,
        double kelvin, bool lZeroOnly = false)
        where TPotential : struct, IPairPotential
    {
        double a = landscape.WindowLowerInAngstroms, length = landscape.WindowWidthInAngstroms;
        int intervals = n + 1;
        var x = new double[n];
        var v = new double[n];
        for (int i = 0; i < n; i++)
        {
            x[i] = a + (i + 1) * length / intervals;
            double e = landscape.CheckedEnergy(x[i]);
            v[i] = Math.Min(e, HardCore);
        }
        var kinetic = Kinetic(n, length, hbar2Over2m);
        bool radial = landscape.Geometry == SeparationGeometry.Radial;
        double escape = Math.Min(Math.Min(landscape.CheckedEnergy(landscape.WindowLowerInAngstroms), HardCore),
            Math.Min(landscape.CheckedEnergy(landscape.WindowUpperInAngstroms), HardCore));
        var probabilities = new double[n];
        double z = 0, above = 0, reference = double.NaN;
        ImmutableArray<double> levels = [];
        int bound = 0, momenta = 0;
        bool allConverged = true;
        for (int l = 0; ; l++)
        {
            var h = kinetic.Clone();
            for (int i = 0; i < n; i++)
            {
                h[i, i] += v[i] + (l == 0 ? 0 : hbar2Over2m * l * (l + 1) / (x[i] * x[i]));
            }
            var evd = h.Evd(Symmetricity.Symmetric);
            var energies = evd.EigenValues.Select(c => c.Real).ToArray();
            var vectors = evd.EigenVectors;
            if (l == 0)
            {
                reference = energies[0];
                levels = [.. energies.Take(50)];
                bound = energies.Count(e => e < escape);
                // The upper third of a grid's spectrum is the grid's, not the landscape's: it must carry no weight that matters.
                if (Math.Exp(-(energies[2 * n / 3] - reference) / kT) > 1e-3 * precision)
                {
                    allConverged = false;
                }
            }
            double shell = 0;
            int degeneracy = 2 * l + 1;
            for (int s = 0; s < n; s++)
            {
                double w = degeneracy * Math.Exp(-(energies[s] - reference) / kT);
                if (w < 1e-300)
                {
                    break;
                }
                shell += w;
                if (energies[s] >= escape)
                {
                    above += w;
                }
                for (int i = 0; i < n; i++)
                {
                    double c = vectors[i, s];
                    probabilities[i] += w * c * c;
                }
            }
            z += shell;
            momenta = l + 1;
            // Stop when this shell could no longer move the result at the requested precision (the shells' weights fall
            // off like a Gaussian in l, so the rest sum to less than this one), or for a line after l = 0.
            if (!radial || lZeroOnly || shell < 1e-3 * precision * z)
            {
                break;
            }
        }
        for (int i = 0; i < n; i++)
        {
            probabilities[i] /= z;
        }
        return new QuantumPairDistribution([.. x], [.. probabilities], levels, bound, above / z, momenta, double.NaN, allConverged, kelvin);
    }

    /// <summary>The same answer with the change between the last two grids, converged only if that change was small enough too.</summary>
    private QuantumPairDistribution WithGridCheck(double change, bool small)
        => new(Grid, Probabilities, LevelsInElectronVolts, BoundLevels, ShareAboveEscape, AngularMomenta, change, small && Converged, TemperatureInKelvin);

    /// <summary>
    /// The kinetic energy on the finite-interval grid (Colbert &amp; Miller 1992, their appendix; recalled from memory and
    /// checked by the particle-in-a-box test, whose levels it reproduces exactly): with L the interval, N = n + 1
    /// intervals, T_ii' = (ħ²/2m)(π²/2L²)(−1)^(i−i')[1/sin²(π(i − i')/2N) − 1/sin²(π(i + i')/2N)] off the diagonal and
    /// (ħ²/2m)(π²/2L²)[(2N² + 1)/3 − 1/sin²(πi/N)] on it, i = 1 … N − 1.
    /// </summary>
    private static Matrix<double> Kinetic(int n, double length, double hbar2Over2m)
    {
        int intervals = n + 1;
        double scale = hbar2Over2m * Math.PI * Math.PI / (2 * length * length);
        var t = Matrix<double>.Build.Dense(n, n);
        for (int i = 1; i <= n; i++)
        {
            double si = Math.Sin(Math.PI * i / intervals);
            t[i - 1, i - 1] = scale * ((2.0 * intervals * intervals + 1) / 3 - 1 / (si * si));
            for (int j = 1; j < i; j++)
            {
                double minus = Math.Sin(Math.PI * (i - j) / (2 * intervals)), plus = Math.Sin(Math.PI * (i + j) / (2 * intervals));
                double value = scale * ((i - j) % 2 == 0 ? 1 : -1) * (1 / (minus * minus) - 1 / (plus * plus));
                t[i - 1, j - 1] = value;
                t[j - 1, i - 1] = value;
            }
        }
        return t;
    }

    /// <summary>A one-line summary.</summary>
    public override string ToString() => string.Create(CultureInfo.InvariantCulture,
        $"quantum: mean {MeanInAngstroms:G6} Å, RMS {RmsInAngstroms:G4} Å at {TemperatureInKelvin:G4} K ({GridPoints} points, {AngularMomenta} l, {(Converged ? "converged" : "not converged")})");
}
