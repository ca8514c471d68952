using System;
using System.Collections.Immutable;
using System.Linq;
using MathNet.Numerics.LinearAlgebra;
using ThermalSampling.Internal;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Units;

namespace ThermalSampling.Analysis;

/// <summary>
/// The leading anharmonic terms of a site's classical displacement distribution, from the third- and fourth-derivative
/// tensors A and B of the energy at the minimum (derivation in docs/perturbation-theory.md): with G = kT·K⁻¹ the harmonic
/// covariance and β = 1/kT,
/// the covariance correction ΔU_ij = (β²/2)[A_abc A_def G_ia G_jd G_be G_cf + A_abc A_def G_ia G_jb G_cd G_ef] − (β/2) B_abcd G_ia G_jb G_cd, of order (kT)²;
/// the third cumulant κ_ijk = −β A_abc G_ia G_jb G_kc, of order (kT)²;
/// the fourth cumulant κ_ijkl = −β B_abcd G_ia G_jb G_kc G_ld + β² Σ_(3 pairings) P_ije G_ef P_klf with P_ije = A_abe G_ia G_jb, of order (kT)³.
/// </summary>
/// <param name="CovarianceCorrection">ΔU, the first anharmonic correction to the covariance (order (kT)²), Å².</param>
/// <param name="ThirdCumulants">κ3's 10 components (order 111, 112, 113, 122, 123, 133, 222, 223, 233, 333), Å³.</param>
/// <param name="FourthCumulants">κ4's 15 components (order 1111, 1112, …, 3333 as in the reports), Å⁴.</param>
public sealed record SitePerturbativeEstimate(SymmetricTensor CovarianceCorrection, ImmutableArray<double> ThirdCumulants, ImmutableArray<double> FourthCumulants);

/// <summary>Classical perturbation theory about a minimum, in any number of dimensions.</summary>
public static class Perturbation
{
    /// <summary>The leading anharmonic covariance correction and cumulants of the site's displacement at <paramref name="temperature"/>.</summary>
    /// <typeparam name="TPotential">The potential type.</typeparam>
    /// <param name="landscape">The landscape.</param>
    /// <param name="temperature">The temperature.</param>
    /// <exception cref="LandscapeException">When there is no stable minimum (as for the harmonic analysis).</exception>
    public static SitePerturbativeEstimate Site<TPotential>(SiteLandscape<TPotential> landscape, Temperature temperature)
        where TPotential : struct, IPairPotential
    {
        Preconditions.CheckNotNull(landscape, nameof(landscape));
        Preconditions.CheckPositive(temperature.InKelvin, nameof(temperature));
        var min = landscape.FindMinimum();
        return Site(landscape, min, landscape.Hessian(min).ToArray(), temperature);
    }

    /// <summary>The same at a minimum and Hessian already found (the harmonic analysis's), so a report does not search again.</summary>
    internal static SitePerturbativeEstimate Site<TPotential>(SiteLandscape<TPotential> landscape, Position min, double[,] hessian, Temperature temperature)
        where TPotential : struct, IPairPotential
    {
        var (dc, k3, k4) = Leading(hessian, Flat(landscape.ThirdDerivatives(min)), Flat(landscape.FourthDerivatives(min)), 3, temperature.ThermalEnergyInElectronVolts);
        return new SitePerturbativeEstimate(SymmetricTensor.FromMatrix(Matrix<double>.Build.DenseOfArray(dc)),
            [.. TensorIndices.Third.Select(t => k3[(t[0] * 3 + t[1]) * 3 + t[2]])],
            [.. TensorIndices.Fourth.Select(t => k4[((t[0] * 3 + t[1]) * 3 + t[2]) * 3 + t[3]])]);
    }

    private static double[] Flat(double[,,] t) => [.. t.Cast<double>()];

    private static double[] Flat(double[,,,] t) => [.. t.Cast<double>()];

    /// <summary>
    /// The leading terms in <paramref name="d"/> dimensions from the Hessian <paramref name="hessian"/>, the third- and
    /// fourth-derivative tensors (flattened, row-major) and kT: ΔU (d×d), κ3 (d³, flattened) and κ4 (d⁴, flattened).
    /// </summary>
    internal static (double[,] CovarianceCorrection, double[] Third, double[] Fourth) Leading(double[,] hessian, double[] a, double[] b, int d, double kT)
    {
        double beta = 1 / kT;
        var g = Matrix<double>.Build.DenseOfArray(hessian).Inverse().Multiply(kT).ToArray();
        int I(int i, int j, int k) => (i * d + j) * d + k;
        int J(int i, int j, int k, int l) => ((i * d + j) * d + k) * d + l;
        // P_ije = A_abe G_ia G_jb, and its full contraction Ã_ijk = P_ije' G_e'k.
        var p = new double[d * d * d];
        for (int i = 0; i < d; i++)
        {
            for (int j = 0; j < d; j++)
            {
                for (int e = 0; e < d; e++)
                {
                    double s = 0;
                    for (int x = 0; x < d; x++)
                    {
                        for (int y = 0; y < d; y++)
                        {
                            s += a[I(x, y, e)] * g[i, x] * g[j, y];
                        }
                    }
                    p[I(i, j, e)] = s;
                }
            }
        }
        var third = new double[d * d * d];
        for (int i = 0; i < d; i++)
        {
            for (int j = 0; j < d; j++)
            {
                for (int k = 0; k < d; k++)
                {
                    double s = 0;
                    for (int e = 0; e < d; e++)
                    {
                        s += p[I(i, j, e)] * g[k, e];
                    }
                    third[I(i, j, k)] = -beta * s;
                }
            }
        }
        // B̃_ijkl = B_abcd G_ia G_jb G_kc G_ld, one index at a time.
        var bt = (double[])b.Clone();
        for (int axis = 0; axis < 4; axis++)
        {
            var next = new double[bt.Length];
            for (int idx = 0; idx < bt.Length; idx++)
            {
                int[] digits = [idx / (d * d * d), idx / (d * d) % d, idx / d % d, idx % d];
                double s = 0;
                for (int x = 0; x < d; x++)
                {
                    int[] from = (int[])digits.Clone();
                    from[axis] = x;
                    s += g[digits[axis], x] * bt[J(from[0], from[1], from[2], from[3])];
                }
                next[idx] = s;
            }
            bt = next;
        }
        var fourth = new double[d * d * d * d];
        for (int i = 0; i < d; i++)
        {
            for (int j = 0; j < d; j++)
            {
                for (int k = 0; k < d; k++)
                {
                    for (int l = 0; l < d; l++)
                    {
                        double chains = Channel(i, j, k, l) + Channel(i, k, j, l) + Channel(i, l, j, k);
                        fourth[J(i, j, k, l)] = -beta * bt[J(i, j, k, l)] + beta * beta * chains;
                    }
                }
            }
        }
        double Channel(int i, int j, int k, int l)
        {
            double s = 0;
            for (int e = 0; e < d; e++)
            {
                for (int f = 0; f < d; f++)
                {
                    s += p[I(i, j, e)] * g[e, f] * p[I(k, l, f)];
                }
            }
            return s;
        }
        // ΔU: the sunset (A G A with two propagators between the vertices), the tadpole (A's third leg closed on A G),
        // and B's self-contraction.
        var tadpole = new double[d]; // t_c = A_cef G_ef
        for (int c = 0; c < d; c++)
        {
            for (int e = 0; e < d; e++)
            {
                for (int f = 0; f < d; f++)
                {
                    tadpole[c] += a[I(c, e, f)] * g[e, f];
                }
            }
        }
        var dc = new double[d, d];
        for (int i = 0; i < d; i++)
        {
            for (int j = 0; j < d; j++)
            {
                double sunset = 0, loop = 0, quartic = 0;
                for (int x = 0; x < d; x++)
                {
                    for (int y = 0; y < d; y++)
                    {
                        double gix = g[i, x], gjy = g[j, y];
                        for (int b1 = 0; b1 < d; b1++)
                        {
                            for (int c1 = 0; c1 < d; c1++)
                            {
                                for (int e = 0; e < d; e++)
                                {
                                    for (int f = 0; f < d; f++)
                                    {
                                        sunset += gix * gjy * a[I(x, b1, c1)] * a[I(y, e, f)] * g[b1, e] * g[c1, f];
                                    }
                                }
                                quartic += gix * gjy * b[J(x, y, b1, c1)] * g[b1, c1];
                            }
                        }
                    }
                }
                for (int c = 0; c < d; c++)
                {
                    for (int e = 0; e < d; e++)
                    {
                        loop += p[I(i, j, c)] * g[c, e] * tadpole[e];
                    }
                }
                dc[i, j] = beta * beta / 2 * (sunset + loop) - beta / 2 * quartic;
            }
        }
        return (dc, third, fourth);
    }
}
