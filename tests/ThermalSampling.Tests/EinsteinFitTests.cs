using System;
using System.Linq;
using MathNet.Numerics.Distributions;
using ThermalSampling.Analysis;
using ThermalSampling.Units;
using Xunit;

namespace ThermalSampling.Tests;

/// <summary>The Einstein fit to U(T): recovery and calibrated errors on synthetic curves, and refusals.</summary>
public class EinsteinFitTests
{
    private static readonly Mass Mass50 = Mass.FromAtomicMassUnits(50);
    private static readonly double[] Kelvins = [10, 20, 40, 60, 80, 120, 160, 220, 300, 400];

    /// <summary>
    /// Synthetic curves from the Einstein form (θ_E = 180 K, 50 u, invented) with Gaussian noise of 3 % per point (errors
    /// known): the fit recovers θ_E within 1.96 of its reported standard errors in 95 ± 3 % of 400 seeded cases, with and
    /// without a fitted static offset (0.002 Å² added in the latter).
    /// </summary>
    [Theory]
    [InlineData(false)]
    [InlineData(true)]
    public void The_fit_recovers_the_Einstein_temperature_within_its_error(bool withOffset)
    {
        const double theta = 180, offset = 0.002;
        int covered = 0;
        for (int seed = 0; seed < 400; seed++)
        {
            var random = new Random(seed);
            var points = Kelvins.Select(k =>
            {
                double u = EinsteinFit.Model(theta, k, 50) + (withOffset ? offset : 0);
                double se = 0.03 * u;
                return new DisplacementPoint(Temperature.FromKelvin(k), u + Normal.Sample(random, 0, se), se);
            }).ToList();
            var fit = EinsteinFit.Fit(points, Mass50, withOffset);
            if (Math.Abs(fit.EinsteinTemperatureInKelvin - theta) <= 1.96 * fit.EinsteinTemperatureStandardError)
            {
                covered++;
            }
        }
        Assert.InRange(covered / 400.0, 0.92, 0.98);
    }

    /// <summary>Without noise the fit returns θ_E and the offset exactly (to the minimiser's tolerance), and χ² ≈ 0.</summary>
    [Fact]
    public void A_noiseless_curve_is_fitted_exactly()
    {
        var points = Kelvins.Select(k => new DisplacementPoint(Temperature.FromKelvin(k), EinsteinFit.Model(250, k, 50) + 0.001, 1e-4)).ToList();
        var fit = EinsteinFit.Fit(points, Mass50, withOffset: true);
        Assert.Equal(250, fit.EinsteinTemperatureInKelvin, 3);
        Assert.Equal(0.001, fit.StaticOffsetInAngstromsSquared, 8);
        Assert.True(fit.ChiSquared < 1e-6);
        Assert.Equal(8, fit.DegreesOfFreedom);
        // The high-temperature limit is the classical k_B T/(mω²): U·θ²/T tends to ħ²/(m k_B)·(1/2)·2 … checked through the model itself.
        Assert.Equal(EinsteinFit.Model(250, 1e6, 50) * 250 / 1e6, EinsteinFit.Model(250, 2e6, 50) * 250 / 2e6, 9);
    }

    /// <summary>The classical form is the quantum one's high-temperature limit, and fits a classical line exactly.</summary>
    [Fact]
    public void The_classical_form_is_the_high_temperature_limit()
    {
        // coth x = 1/x + x/3 + …: at x = θ/2T = 7.5e-4 the forms differ by x²/3 ≈ 2e-7 relative.
        Assert.Equal(1, EinsteinFit.Model(150, 1e5, 50) / EinsteinFit.Model(150, 1e5, 50, EinsteinForm.Classical), 6);
        var points = Kelvins.Select(k => new DisplacementPoint(Temperature.FromKelvin(k), EinsteinFit.Model(150, k, 50, EinsteinForm.Classical), 1e-5)).ToList();
        var fit = EinsteinFit.Fit(points, Mass50, form: EinsteinForm.Classical);
        Assert.Equal(150, fit.EinsteinTemperatureInKelvin, 3);
        Assert.True(fit.ChiSquared < 1e-6);
    }

    [Fact]
    public void Too_few_points_or_bad_errors_are_refused_naming_them()
    {
        var one = new[] { new DisplacementPoint(Temperature.FromKelvin(100), 0.01, 0.001) };
        Assert.Contains("at least 2", Assert.Throws<ArgumentException>(() => EinsteinFit.Fit(one, Mass50)).Message);
        var bad = new[] { new DisplacementPoint(Temperature.FromKelvin(100), 0.01, 0.001), new DisplacementPoint(Temperature.FromKelvin(200), 0.02, 0) };
        Assert.Contains("the error positive", Assert.Throws<ArgumentException>(() => EinsteinFit.Fit(bad, Mass50)).Message);
    }
}
