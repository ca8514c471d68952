using System;
using System.Collections.Generic;
using System.Globalization;
using System.Linq;
using ThermalSampling.Internal;
using ThermalSampling.Units;

namespace ThermalSampling.Landscapes;

/// <summary>
/// The electrostatic potential of a periodic crystal of point charges by Ewald summation (Ewald, Ann. Phys. 369, 253
/// (1921)): φ(r) = k_e[Σ_j Σ_n q_j erfc(α|r − r_j − n|)/|r − r_j − n| + (4π/V) Σ_{k≠0} e^(−k²/4α²)/k² Σ_j q_j cos k·(r − r_j)]
/// for a neutral cell (the k = 0 term vanishes; the tin-foil convention), k_e = e/(4πε₀). The splitting α and the
/// cut-offs follow the error estimates of Kolafa &amp; Perram (Mol. Simul. 9, 351 (1992)): with both sums cut where their
/// leading terms fall to ε = the requested accuracy, r_c = √(−ln ε)/α and k_c = 2α√(−ln ε); α balances the two sums'
/// costs (α = √π (N/V²)^(1/6), N the charges in the cell). A non-neutral cell is refused.
/// </summary>
public sealed class EwaldField
{
    private readonly Position[] _positions;
    private readonly double[] _charges;
    private readonly Position[] _realImages;
    private readonly (Position K, double Weight)[] _waves;
    private readonly double _alpha, _cutoff;

    private EwaldField(Position[] positions, double[] charges, Position[] lattice, double alpha, double accuracy)
    {
        _positions = positions;
        _charges = charges;
        _alpha = alpha;
        double log = Math.Sqrt(-Math.Log(accuracy));
        _cutoff = log / alpha;
        double kCut = 2 * alpha * log;
        Position a = lattice[0], b = lattice[1], c = lattice[2];
        double volume = Math.Abs(Dot(a, Cross(b, c)));
        Volume = volume;
        // Real-space images: every lattice vector that can bring a charge within the cut-off of a point in the cell.
        double reach = _cutoff + (a.Norm + b.Norm + c.Norm);
        int na = (int)Math.Ceiling(reach * Cross(b, c).Norm / volume), nb = (int)Math.Ceiling(reach * Cross(c, a).Norm / volume), nc = (int)Math.Ceiling(reach * Cross(a, b).Norm / volume);
        var images = new List<Position>();
        for (int i = -na; i <= na; i++)
        {
            for (int j = -nb; j <= nb; j++)
            {
                for (int k = -nc; k <= nc; k++)
                {
                    images.Add(i * a + j * b + k * c);
                }
            }
        }
        _realImages = [.. images];
        // Reciprocal vectors within k_c.
        var ra = (2 * Math.PI / volume) * Cross(b, c);
        var rb = (2 * Math.PI / volume) * Cross(c, a);
        var rc = (2 * Math.PI / volume) * Cross(a, b);
        int ma = (int)Math.Ceiling(kCut / ra.Norm) + 1, mb = (int)Math.Ceiling(kCut / rb.Norm) + 1, mc = (int)Math.Ceiling(kCut / rc.Norm) + 1;
        var waves = new List<(Position, double)>();
        for (int i = -ma; i <= ma; i++)
        {
            for (int j = -mb; j <= mb; j++)
            {
                for (int k = -mc; k <= mc; k++)
                {
                    if (i == 0 && j == 0 && k == 0)
                    {
                        continue;
                    }
                    var kv = i * ra + j * rb + k * rc;
                    double k2 = Dot(kv, kv);
                    if (k2 <= kCut * kCut)
                    {
                        waves.Add((kv, 4 * Math.PI / volume * Math.Exp(-k2 / (4 * alpha * alpha)) / k2));
                    }
                }
            }
        }
        _waves = [.. waves];
    }

    /// <summary>The cell's volume, Å³.</summary>
    public double Volume { get; }

    /// <summary>The splitting parameter α, 1/Å.</summary>
    public double Splitting => _alpha;

    /// <summary>
    /// The Ewald field of <paramref name="structure"/>'s charges (per species label, in elementary charges).
    /// </summary>
    /// <param name="structure">A periodic structure (with a lattice).</param>
    /// <param name="charges">The charge of each species present, e; a species without one is an error naming it.</param>
    /// <param name="accuracy">The relative size at which both sums are cut (Kolafa–Perram), 1e-15 to 1e-3.</param>
    /// <param name="splitting">α, 1/Å, or null for the balanced choice.</param>
    /// <exception cref="ArgumentException">Without a lattice, with a species lacking a charge, or a cell that is not neutral (the net charge named).</exception>
    public static EwaldField Create(Structure structure, IReadOnlyDictionary<string, double> charges, double accuracy = 1e-10, double? splitting = null)
    {
        Preconditions.CheckNotNull(structure, nameof(structure));
        Preconditions.CheckNotNull(charges, nameof(charges));
        if (structure.Lattice.Length != 3)
        {
            throw new ArgumentException("structure has no lattice: Ewald summation needs a periodic cell.", nameof(structure));
        }
        if (!(accuracy >= 1e-15 && accuracy <= 1e-3))
        {
            throw new ArgumentOutOfRangeException(nameof(accuracy), accuracy, "accuracy must be from 1e-15 to 1e-3.");
        }
        var missing = structure.Atoms.Select(a => a.Species).Distinct().Where(s => !charges.ContainsKey(s)).ToList();
        if (missing.Count > 0)
        {
            throw new ArgumentException($"charges has no entry for species {string.Join(", ", missing)}.", nameof(charges));
        }
        double[] q = [.. structure.Atoms.Select(a => charges[a.Species])];
        double net = q.Sum();
        if (Math.Abs(net) > 1e-9 * Math.Max(1, q.Sum(Math.Abs)))
        {
            throw new ArgumentException(string.Create(CultureInfo.InvariantCulture, $"the cell is not neutral: its net charge is {net:G6} e; Ewald summation of a charged cell is not defined here."), nameof(charges));
        }
        var lattice = structure.Lattice;
        double volume = Math.Abs(Dot(lattice[0], Cross(lattice[1], lattice[2])));
        double alpha = splitting ?? Math.Sqrt(Math.PI) * Math.Pow(q.Length / (volume * volume), 1.0 / 6);
        Preconditions.CheckPositive(alpha, nameof(splitting));
        return new EwaldField([.. structure.Atoms.Select(a => a.Position)], q, [.. lattice], alpha, accuracy);
    }

    /// <summary>
    /// φ at <paramref name="point"/>, V (eV per elementary charge), from every charge of the crystal; with
    /// <paramref name="excluding"/>, without that atom's own term (its periodic images stay): the field the atom feels
    /// from the rest of the crystal when it moves to <paramref name="point"/>.
    /// </summary>
    /// <param name="point">The point, Å (not on a charge other than <paramref name="excluding"/>).</param>
    /// <param name="excluding">An atom index, or null.</param>
    public double PotentialInVolts(Position point, int? excluding = null)
    {
        double real = 0;
        for (int j = 0; j < _positions.Length; j++)
        {
            foreach (var n in _realImages)
            {
                var d = point - _positions[j] - n;
                double r = d.Norm;
                if (r > _cutoff)
                {
                    continue;
                }
                bool self = excluding == j && n == Position.Origin;
                if (self)
                {
                    // Remove the atom's bare 1/r, keeping its screened part's smooth remainder: −q erf(αr)/r (→ −2αq/√π at r = 0).
                    real -= r < 1e-12 ? 2 * _alpha / Math.Sqrt(Math.PI) * _charges[j] : _charges[j] * MathNet.Numerics.SpecialFunctions.Erf(_alpha * r) / r;
                    continue;
                }
                real += _charges[j] * MathNet.Numerics.SpecialFunctions.Erfc(_alpha * r) / r;
            }
        }
        double reciprocal = 0;
        foreach (var (k, weight) in _waves)
        {
            double s = 0;
            for (int j = 0; j < _positions.Length; j++)
            {
                s += _charges[j] * Math.Cos(Dot(k, point - _positions[j]));
            }
            reciprocal += weight * s;
        }
        return PhysicalConstants.CoulombVoltAngstrom * (real + reciprocal);
    }

    private static double Dot(Position a, Position b) => a.X * b.X + a.Y * b.Y + a.Z * b.Z;

    private static Position Cross(Position a, Position b) => new(a.Y * b.Z - a.Z * b.Y, a.Z * b.X - a.X * b.Z, a.X * b.Y - a.Y * b.X);
}

/// <summary>The Coulomb energy of an ion moving about its site in the field of the rest of its crystal, in the hot loop's form.</summary>
public static class CoulombSite
{
    /// <summary>
    /// E(r) = q[φ_crystal(r) − q/(4πε₀|r − r_home|)], eV: the moving atom's charge q in the Ewald field of every other
    /// charge of the infinite crystal (its own periodic images included, its home site's bare term left out), fitted as a
    /// polynomial of <paramref name="degree"/> about its home in a ball of <paramref name="radius"/>. The field is
    /// harmonic (∇²φ = 0) there, so the fit converges like (radius/nearest charge)^(degree + 1);
    /// <see cref="PolynomialField.FitError"/> states the largest error against Ewald at check points.
    /// </summary>
    /// <param name="structure">The periodic structure.</param>
    /// <param name="atom">The moving atom's index.</param>
    /// <param name="charges">The charge of each species, e (a neutral cell).</param>
    /// <param name="radius">The ball the particle stays in, Å (at least the confinement's reach).</param>
    /// <param name="degree">The polynomial's degree, 2 to 12 (default 8).</param>
    /// <param name="accuracy">The Ewald sums' accuracy (Kolafa–Perram cut-offs).</param>
    public static PolynomialField Field(Structure structure, int atom, IReadOnlyDictionary<string, double> charges, double radius, int degree = 8, double accuracy = 1e-10)
    {
        Preconditions.CheckNotNull(structure, nameof(structure));
        if (atom < 0 || atom >= structure.Atoms.Length)
        {
            throw new ArgumentOutOfRangeException(nameof(atom), atom, $"atom must be from 0 to {structure.Atoms.Length - 1}.");
        }
        var ewald = EwaldField.Create(structure, charges, accuracy);
        double q = charges[structure.Atoms[atom].Species];
        return PolynomialField.Fit(p => q * ewald.PotentialInVolts(p, atom), structure.Atoms[atom].Position, radius, degree);
    }
}
