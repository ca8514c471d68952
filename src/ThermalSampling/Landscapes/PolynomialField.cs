using System;
using System.Collections.Generic;
using System.Linq;
using MathNet.Numerics.LinearAlgebra;
using ThermalSampling.Internal;

namespace ThermalSampling.Landscapes;

/// <summary>
/// A smooth field about a point as a polynomial in the displacement u = x − centre, Σ c_abc u_x^a u_y^b u_z^c over
/// a + b + c ≤ degree: the hot loop's form of a slowly varying energy such as the Coulomb field of a crystal around a
/// site. Fitted by least squares (MathNet QR) to the field at points filling a ball; its value and derivatives are exact
/// for the polynomial, and <see cref="FitError"/> states how far it is from the field it was fitted to.
/// </summary>
public sealed class PolynomialField
{
    private readonly int[] _a, _b, _c;
    private readonly double[] _coefficients;

    private PolynomialField(Position centre, int degree, int[] a, int[] b, int[] c, double[] coefficients, double radius)
        => (Centre, Degree, _a, _b, _c, _coefficients, Radius) = (centre, degree, a, b, c, coefficients, radius);

    /// <summary>The expansion point, Å.</summary>
    public Position Centre { get; }

    /// <summary>The polynomial's degree.</summary>
    public int Degree { get; }

    /// <summary>The radius of the ball it was fitted in, Å.</summary>
    public double Radius { get; }

    /// <summary>The largest |polynomial − field| over the check points (not used in the fit) in the ball, in the field's unit.</summary>
    public double FitError { get; private set; }

    /// <summary>The monomial exponents (a, b, c) and coefficients, for kernels.</summary>
    internal (int[] A, int[] B, int[] C, double[] Coefficients) Terms => (_a, _b, _c, _coefficients);

    /// <summary>
    /// Fits <paramref name="field"/> in the ball of <paramref name="radius"/> about <paramref name="centre"/>.
    /// </summary>
    /// <param name="field">The field, any unit.</param>
    /// <param name="centre">The expansion point, Å.</param>
    /// <param name="radius">The ball's radius, Å (positive).</param>
    /// <param name="degree">The degree, 2 to 12.</param>
    public static PolynomialField Fit(Func<Position, double> field, Position centre, double radius, int degree = 8)
    {
        Preconditions.CheckNotNull(field, nameof(field));
        Preconditions.CheckPositive(radius, nameof(radius));
        if (degree is < 2 or > 12)
        {
            throw new ArgumentOutOfRangeException(nameof(degree), degree, "degree must be from 2 to 12.");
        }
        var terms = new List<(int, int, int)>();
        for (int total = 0; total <= degree; total++)
        {
            for (int a = total; a >= 0; a--)
            {
                for (int b = total - a; b >= 0; b--)
                {
                    terms.Add((a, b, total - a - b));
                }
            }
        }
        // Points filling the ball (deterministic, no random numbers), scaled to unit radius for conditioning; the check
        // points come later in the same sequences, so none is a fit point.
        var fitPoints = BallPoints(4 * terms.Count, 0);
        var checkPoints = BallPoints(terms.Count, 4 * terms.Count + 1000);
        var design = Matrix<double>.Build.Dense(fitPoints.Count, terms.Count, (i, j) => Monomial(fitPoints[i], terms[j]));
        var values = Vector<double>.Build.Dense(fitPoints.Count, i => field(centre + radius * fitPoints[i]));
        var unitCoefficients = design.QR().Solve(values);
        var coefficients = new double[terms.Count];
        for (int j = 0; j < terms.Count; j++)
        {
            var (a, b, c) = terms[j];
            coefficients[j] = unitCoefficients[j] / Math.Pow(radius, a + b + c);
        }
        var result = new PolynomialField(centre, degree, [.. terms.Select(t => t.Item1)], [.. terms.Select(t => t.Item2)], [.. terms.Select(t => t.Item3)], coefficients, radius);
        result.FitError = checkPoints.Max(p => Math.Abs(result.Value(centre + radius * p) - field(centre + radius * p)));
        return result;
    }

    /// <summary>
    /// Points filling the unit ball: radius, height and angle from the Halton sequences in bases 2, 3 and 5 (independent
    /// low-discrepancy coordinates, so the points do not lie on one curve), starting at index <paramref name="start"/>.
    /// </summary>
    private static List<Position> BallPoints(int count, int start)
    {
        var points = new List<Position>(count);
        for (int i = start + 1; i <= start + count; i++)
        {
            double r = Math.Cbrt(Halton(i, 2)), z = 1 - 2 * Halton(i, 3), angle = 2 * Math.PI * Halton(i, 5);
            double rho = Math.Sqrt(Math.Max(0, 1 - z * z));
            points.Add(new Position(r * rho * Math.Cos(angle), r * rho * Math.Sin(angle), r * z));
        }
        return points;
    }

    private static double Halton(int index, int b)
    {
        double f = 1, result = 0;
        for (int i = index; i > 0; i /= b)
        {
            f /= b;
            result += f * (i % b);
        }
        return result;
    }

    private static double Monomial(Position u, (int A, int B, int C) t) => Math.Pow(u.X, t.A) * Math.Pow(u.Y, t.B) * Math.Pow(u.Z, t.C);

    /// <summary>The polynomial at <paramref name="position"/>.</summary>
    /// <param name="position">The position, Å.</param>
    public double Value(Position position) => Derivative(position, 0, 0, 0);

    /// <summary>∂^(i+j+k)/∂x^i∂y^j∂z^k of the polynomial at <paramref name="position"/>.</summary>
    /// <param name="position">The position, Å.</param>
    /// <param name="i">Derivatives in x.</param>
    /// <param name="j">Derivatives in y.</param>
    /// <param name="k">Derivatives in z.</param>
    public double Derivative(Position position, int i, int j, int k)
    {
        var u = position - Centre;
        // Powers of each component once (no Math.Pow per term: the basin map evaluates this at up to 81³ points).
        Span<double> px = stackalloc double[Degree + 1], py = stackalloc double[Degree + 1], pz = stackalloc double[Degree + 1];
        (px[0], py[0], pz[0]) = (1, 1, 1);
        for (int q = 1; q <= Degree; q++)
        {
            (px[q], py[q], pz[q]) = (px[q - 1] * u.X, py[q - 1] * u.Y, pz[q - 1] * u.Z);
        }
        double sum = 0;
        for (int t = 0; t < _coefficients.Length; t++)
        {
            if (_a[t] < i || _b[t] < j || _c[t] < k)
            {
                continue;
            }
            sum += _coefficients[t] * Falling(_a[t], i) * Falling(_b[t], j) * Falling(_c[t], k) * px[_a[t] - i] * py[_b[t] - j] * pz[_c[t] - k];
        }
        return sum;
    }

    /// <summary>n(n − 1)…(n − m + 1).</summary>
    private static double Falling(int n, int m)
    {
        double f = 1;
        for (int q = 0; q < m; q++)
        {
            f *= n - q;
        }
        return f;
    }

    /// <summary>The polynomial times <paramref name="factor"/> (for example a charge: a potential into an energy).</summary>
    /// <param name="factor">The factor.</param>
    public PolynomialField Scaled(double factor)
        => new(Centre, Degree, _a, _b, _c, [.. _coefficients.Select(c => c * factor)], Radius) { FitError = FitError * Math.Abs(factor) };
}
