using System;
using System.Linq;
using MathNet.Numerics;
using MathNet.Numerics.Distributions;
using MathNet.Numerics.Integration;
using ThermalSampling.Analysis;
using ThermalSampling.Internal;
using ThermalSampling.Landscapes;
using ThermalSampling.Statistics;
using Xunit;

namespace ThermalSampling.Tests;

/// <summary>The Gram–Charlier series in the convention of Kuhs (Acta Cryst. A48, 80–98 (1992)) and the IUCr report (Trueblood et al. 1996).</summary>
public class GramCharlierTests
{
    /// <summary>
    /// Round trip of the relations between cumulants and quasi-moments to fourth order (Kuhs 1992: with the Gaussian of
    /// the true mean and covariance, c^{jkl} = κ^{jkl} and d^{jklm} = κ^{jklm}): invented κ2 (anisotropic, with off-diagonal
    /// terms), κ3 and κ4 → quasi-moments → the series density → its moments by Gauss–Legendre quadrature (MathNet, 40
    /// points per whitened axis over ±9) → cumulants (the library's estimator of raw sums) give back κ2, κ3 and κ4, and the
    /// density integrates to 1 with zero mean.
    /// </summary>
    [Fact]
    public void Cumulants_survive_the_round_trip_through_the_series_density()
    {
        var u = new SymmetricTensor(0.010, 0.006, 0.004, 0.002, -0.001, 0.0005);
        double[] k3 = [2e-5, -1e-5, 5e-6, 3e-6, 1e-6, -4e-6, 1.5e-5, 2e-6, -3e-6, 8e-6];
        double[] k4 = [-3e-7, 1e-7, 5e-8, -1e-7, 2e-8, -5e-8, 4e-8, -2e-8, 1e-8, 3e-8, -2e-7, 5e-8, -4e-8, 2e-8, -1e-7];
        var (c, d) = GramCharlier.QuasiMoments(k3, k4);
        // Whitened coordinates: u = L·z with L the Cholesky factor of U, so the Gaussian is standard in z.
        var chol = u.ToMatrix().Cholesky().Factor;
        var rule = new GaussLegendreRule(-9, 9, 40);
        double jacobian = chol.Determinant();
        var sums = new double[CumulantSums.SizeFor(3)];
        var powers = new double[sums.Length];
        for (int a = 0; a < rule.Order; a++)
        {
            for (int b = 0; b < rule.Order; b++)
            {
                for (int e = 0; e < rule.Order; e++)
                {
                    double za = rule.Abscissas[a], zb = rule.Abscissas[b], ze = rule.Abscissas[e];
                    var p = new Position(chol[0, 0] * za, chol[1, 0] * za + chol[1, 1] * zb, chol[2, 0] * za + chol[2, 1] * zb + chol[2, 2] * ze);
                    double weight = rule.Weights[a] * rule.Weights[b] * rule.Weights[e] * jacobian * GramCharlier.Density(p, u, c, d);
                    CumulantSums.Powers([p.X, p.Y, p.Z], powers);
                    for (int i = 0; i < sums.Length; i++)
                    {
                        sums[i] += weight * powers[i];
                    }
                }
            }
        }
        Assert.Equal(1.0, sums[0], 12);
        Assert.All(sums[1..4], m => Assert.Equal(0, m, 12));
        // Second-order sums in the order xx, xy, xz, yy, yz, zz.
        double[] second = [u.XX, u.XY, u.XZ, u.YY, u.YZ, u.ZZ];
        for (int i = 0; i < 6; i++)
        {
            Assert.Equal(second[i], sums[4 + i], 12);
        }
        var third = new double[10];
        var fourth = new double[15];
        CumulantEstimate.Cumulants(sums, 3, third, fourth);
        for (int i = 0; i < 10; i++)
        {
            Assert.Equal(k3[i], third[i], 1e-12);
        }
        for (int i = 0; i < 15; i++)
        {
            Assert.Equal(k4[i], fourth[i], 1e-13);
        }
    }

    /// <summary>
    /// The one-dimensional series against a known non-Gaussian density: a Gamma density (shape 100, scale 0.01 Å, invented)
    /// has cumulants κn = αθⁿ(n − 1)! (closed form). Its Gram–Charlier series with those κ3 and κ4 integrates to 1 and is
    /// at least five times closer to the exact density (largest difference over ±5σ) than the Gaussian of the same mean
    /// and variance; the series' temperature factor matches the Gamma's characteristic function (1 − iqθ)^−α turned to
    /// the mean to within the next order (κ3² and κ5 terms, each below 1e-3 here), |Δ| below 2e-3 at q σ = 1.
    /// </summary>
    [Fact]
    public void The_series_approximates_a_gamma_density_from_its_cumulants()
    {
        const double alpha = 100, theta = 0.01;
        double mean = alpha * theta, variance = alpha * theta * theta, sigma = Math.Sqrt(variance);
        double k3 = 2 * alpha * theta * theta * theta, k4 = 6 * alpha * Math.Pow(theta, 4);
        var gamma = new Gamma(alpha, 1 / theta);
        double worstSeries = 0, worstGauss = 0;
        for (int i = -500; i <= 500; i++)
        {
            double x = mean + sigma * i / 100.0;
            double exact = gamma.Density(x);
            worstSeries = Math.Max(worstSeries, Math.Abs(GramCharlier.Density(x, mean, variance, k3, k4) - exact));
            worstGauss = Math.Max(worstGauss, Math.Abs(GramCharlier.Density(x, mean, variance, 0, 0) - exact));
        }
        Assert.True(worstSeries * 5 < worstGauss, $"series {worstSeries:G3}, Gaussian {worstGauss:G3}");
        Assert.Equal(1.0, Integrate.OnClosedInterval(x => GramCharlier.Density(x, mean, variance, k3, k4), mean - 12 * sigma, mean + 12 * sigma), 10);

        double q = 1 / sigma;
        var phi = CharacteristicGamma(alpha, theta, q, mean);
        var (re, im) = GramCharlier.TemperatureFactor(new Position(q, 0, 0), new SymmetricTensor(variance, 1, 1, 0, 0, 0),
            [k3, 0, 0, 0, 0, 0, 0, 0, 0, 0], [k4, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0]);
        Assert.Equal(phi.Real, re, 2e-3);
        Assert.Equal(phi.Imaginary, im, 2e-3);
    }

    /// <summary>The Gamma characteristic function about the mean, E[exp(iq(x − μ))] = e^(−iqμ)(1 − iqθ)^(−α) (closed form).</summary>
    private static System.Numerics.Complex CharacteristicGamma(double alpha, double theta, double q, double mean)
        => System.Numerics.Complex.Exp(new System.Numerics.Complex(0, -q * mean)) * System.Numerics.Complex.Pow(new System.Numerics.Complex(1, -q * theta), -alpha);

    [Fact]
    public void Bad_tensors_are_refused_by_name()
    {
        Assert.Equal("packed", Assert.Throws<ArgumentException>(() => GramCharlier.TemperatureFactor(new Position(1, 0, 0), new SymmetricTensor(1, 1, 1, 0, 0, 0), [1.0], new double[15])).ParamName);
        Assert.Equal("covariance", Assert.Throws<ArgumentOutOfRangeException>(() => GramCharlier.Density(new Position(0, 0, 0), new SymmetricTensor(1, -1, 1, 0, 0, 0), new double[10], new double[15])).ParamName);
        Assert.Equal("variance", Assert.Throws<ArgumentOutOfRangeException>(() => GramCharlier.Density(0, 0, 0, 0, 0)).ParamName);
    }
}
