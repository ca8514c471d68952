using System;
using System.Collections.Generic;
using MathNet.Numerics.LinearAlgebra;
using ThermalSampling.Internal;
using ThermalSampling.Landscapes;

namespace ThermalSampling.Analysis;

/// <summary>
/// The Gram–Charlier series of a displacement density to fourth order, in the convention of the IUCr report on
/// displacement parameters (Trueblood et al., Acta Cryst. A52, 770–781 (1996)) and Kuhs (Acta Cryst. A48, 80–98 (1992)):
/// p(u) = G(u)·[1 + (1/3!) c^{jkl} H_{jkl}(u) + (1/4!) d^{jklm} H_{jklm}(u)], G the Gaussian of the true mean and covariance
/// U, and H the Hermite tensors of that Gaussian (with g = U⁻¹ and w = g·(u − ⟨u⟩): H_{jkl} = w_j w_k w_l − (w_j g_{kl} + …),
/// H_{jklm} = w_j w_k w_l w_m − (w_j w_k g_{lm} + 5 more) + (g_{jk} g_{lm} + 2 more)). Its Fourier transform is the
/// temperature factor T(Q) = exp(−½ QᵀUQ)·[1 + (i³/3!) c^{jkl} Q_j Q_k Q_l + (i⁴/4!) d^{jklm} Q_j Q_k Q_l Q_m] about the mean
/// (Q = 2πh for a reflection h). With the Gaussian of the true mean and covariance, the quasi-moments c and d equal
/// the third and fourth cumulants; they first differ at sixth order (c^{jklmnp} = κ^{jklmnp} + 10 κ^{(jkl}κ^{mnp)}).
/// Packed components are in the cumulants' order (111, 112, …, 333 and 1111, …, 3333).
/// </summary>
public static class GramCharlier
{
    /// <summary>The third- and fourth-order quasi-moments (c, d) from the cumulants: the same values to fourth order.</summary>
    /// <param name="thirdCumulants">κ3: 1 (a line) or 10 packed components.</param>
    /// <param name="fourthCumulants">κ4: 1 or 15 packed components.</param>
    public static (double[] Third, double[] Fourth) QuasiMoments(IReadOnlyList<double> thirdCumulants, IReadOnlyList<double> fourthCumulants)
    {
        Preconditions.CheckNotNull(thirdCumulants, nameof(thirdCumulants));
        Preconditions.CheckNotNull(fourthCumulants, nameof(fourthCumulants));
        return ([.. thirdCumulants], [.. fourthCumulants]);
    }

    /// <summary>The one-dimensional series at <paramref name="x"/>: φ(z)/σ·[1 + c/(6σ³) He₃(z) + d/(24σ⁴) He₄(z)], z = (x − mean)/σ.</summary>
    /// <param name="x">The point, Å.</param>
    /// <param name="mean">The mean, Å.</param>
    /// <param name="variance">The variance, Å², positive.</param>
    /// <param name="third">The third quasi-moment (κ3), Å³.</param>
    /// <param name="fourth">The fourth quasi-moment (κ4), Å⁴.</param>
    public static double Density(double x, double mean, double variance, double third, double fourth)
    {
        double s = Math.Sqrt(Preconditions.CheckPositive(variance, nameof(variance)));
        double z = (x - mean) / s, z2 = z * z;
        double he3 = z * (z2 - 3), he4 = z2 * z2 - 6 * z2 + 3;
        return Math.Exp(-0.5 * z2) / (s * Math.Sqrt(2 * Math.PI)) * (1 + third / (6 * s * s * s) * he3 + fourth / (24 * s * s * s * s) * he4);
    }

    /// <summary>The three-dimensional series at displacement <paramref name="u"/> from the mean, 1/Å³.</summary>
    /// <param name="u">The displacement from the mean, Å.</param>
    /// <param name="covariance">U, positive definite, Å².</param>
    /// <param name="third">c: 10 packed components, Å³.</param>
    /// <param name="fourth">d: 15 packed components, Å⁴.</param>
    public static double Density(Position u, SymmetricTensor covariance, IReadOnlyList<double> third, IReadOnlyList<double> fourth)
    {
        var (g, det) = Inverse(covariance);
        double[] du = [u.X, u.Y, u.Z];
        var w = new double[3];
        for (int i = 0; i < 3; i++)
        {
            w[i] = g[i, 0] * du[0] + g[i, 1] * du[1] + g[i, 2] * du[2];
        }
        double quadratic = du[0] * w[0] + du[1] * w[1] + du[2] * w[2];
        double series = 1 + Contract(third, TensorIndices.Third, t => H3(w, g, t[0], t[1], t[2])) / 6
            + Contract(fourth, TensorIndices.Fourth, t => H4(w, g, t[0], t[1], t[2], t[3])) / 24;
        return Math.Exp(-0.5 * quadratic) / Math.Sqrt(Math.Pow(2 * Math.PI, 3) * det) * series;
    }

    /// <summary>T(Q) about the mean: exp(−½ QᵀUQ)·[1 + d^{jklm}Q_jQ_kQ_lQ_m/24 − i c^{jkl}Q_jQ_kQ_l/6].</summary>
    /// <param name="q">The scattering vector, Å⁻¹.</param>
    /// <param name="covariance">U, Å².</param>
    /// <param name="third">c: 10 packed components, Å³.</param>
    /// <param name="fourth">d: 15 packed components, Å⁴.</param>
    public static (double Real, double Imaginary) TemperatureFactor(Position q, SymmetricTensor covariance, IReadOnlyList<double> third, IReadOnlyList<double> fourth)
    {
        double[] v = [q.X, q.Y, q.Z];
        double gaussian = Math.Exp(-0.5 * covariance.Quadratic(q));
        double c = Contract(third, TensorIndices.Third, t => v[t[0]] * v[t[1]] * v[t[2]]);
        double d = Contract(fourth, TensorIndices.Fourth, t => v[t[0]] * v[t[1]] * v[t[2]] * v[t[3]]);
        return (gaussian * (1 + d / 24), -gaussian * c / 6);
    }

    /// <summary>Σ over the full tensor of component·f(indices), from packed components: each packed tuple counted as often as it has distinct orderings.</summary>
    private static double Contract(IReadOnlyList<double> packed, int[][] tuples, Func<int[], double> f)
    {
        if (packed.Count != tuples.Length)
        {
            throw new ArgumentException($"the tensor has {packed.Count} packed components; order {tuples[0].Length} needs {tuples.Length}.", nameof(packed));
        }
        double sum = 0;
        for (int c = 0; c < tuples.Length; c++)
        {
            sum += packed[c] * Orderings(tuples[c]) * f(tuples[c]);
        }
        return sum;
    }

    /// <summary>The number of distinct orderings of a sorted index tuple: n!/Π(multiplicity!).</summary>
    private static int Orderings(int[] sorted)
    {
        int n = sorted.Length, result = Factorial(n), run = 1;
        for (int i = 1; i <= n; i++)
        {
            if (i < n && sorted[i] == sorted[i - 1])
            {
                run++;
            }
            else
            {
                result /= Factorial(run);
                run = 1;
            }
        }
        return result;
    }

    private static int Factorial(int n) => n <= 1 ? 1 : n * Factorial(n - 1);

    private static double H3(double[] w, Matrix<double> g, int j, int k, int l)
        => w[j] * w[k] * w[l] - (w[j] * g[k, l] + w[k] * g[j, l] + w[l] * g[j, k]);

    private static double H4(double[] w, Matrix<double> g, int j, int k, int l, int m)
        => w[j] * w[k] * w[l] * w[m]
            - (w[j] * w[k] * g[l, m] + w[j] * w[l] * g[k, m] + w[j] * w[m] * g[k, l] + w[k] * w[l] * g[j, m] + w[k] * w[m] * g[j, l] + w[l] * w[m] * g[j, k])
            + (g[j, k] * g[l, m] + g[j, l] * g[k, m] + g[j, m] * g[k, l]);

    private static (Matrix<double> Inverse, double Determinant) Inverse(SymmetricTensor covariance)
    {
        var m = covariance.ToMatrix();
        double det = m.Determinant();
        if (!(det > 0) || covariance.Eigenvalues().Smallest <= 0)
        {
            throw new ArgumentOutOfRangeException(nameof(covariance), covariance, "The covariance must be positive definite.");
        }
        return (m.Inverse(), det);
    }
}
