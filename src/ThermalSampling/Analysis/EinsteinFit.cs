using System;
using System.Collections.Generic;
using System.Globalization;
using System.Linq;
using ThermalSampling.Internal;
using ThermalSampling.Units;

namespace ThermalSampling.Analysis;

/// <summary>One point of a U_iso(T) curve: the temperature and the mean-square displacement along one axis with its standard error.</summary>
/// <param name="Temperature">The temperature.</param>
/// <param name="IsotropicDisplacementInAngstromsSquared">U_iso = MSD/3 (or U along one axis), Å².</param>
/// <param name="StandardError">Its standard error, Å² (positive).</param>
public readonly record struct DisplacementPoint(Temperature Temperature, double IsotropicDisplacementInAngstromsSquared, double StandardError);

/// <summary>Which Einstein form to fit.</summary>
public enum EinsteinForm
{
    /// <summary>The quantum form (ħ²/2m k_B θ_E) coth(θ_E/2T): for measured curves and quantum results.</summary>
    Quantum,

    /// <summary>Its classical limit ħ² T/(m k_B θ_E²) = k_B T/(mω_E²): for classically sampled curves, which have no zero-point part.</summary>
    Classical,
}

/// <summary>The Einstein model fitted to a U(T) curve.</summary>
/// <param name="EinsteinTemperatureInKelvin">θ_E = ħω_E/k_B, K.</param>
/// <param name="EinsteinTemperatureStandardError">Its standard error, K (from the curvature of χ² at the minimum, the offset profiled out).</param>
/// <param name="StaticOffsetInAngstromsSquared">The temperature-independent offset U₀, Å² (0 when not fitted).</param>
/// <param name="StaticOffsetStandardError">Its standard error at the fitted θ_E, Å² (0 when not fitted).</param>
/// <param name="ChiSquared">χ² of the fit with the given standard errors.</param>
/// <param name="DegreesOfFreedom">Points less fitted parameters.</param>
public sealed record EinsteinFitResult(double EinsteinTemperatureInKelvin, double EinsteinTemperatureStandardError, double StaticOffsetInAngstromsSquared,
    double StaticOffsetStandardError, double ChiSquared, int DegreesOfFreedom);

/// <summary>
/// Fits the Einstein model U(T) = (ħ/2mω_E) coth(ħω_E/2k_BT) + U₀ = (ħ²/2m k_B θ_E) coth(θ_E/2T) + U₀ (textbook closed form)
/// to a sampled U_iso(T) curve by weighted least squares, so that a computed curve can be set beside a measured one.
/// </summary>
/// <remarks>
/// A classically sampled curve has no zero-point part: fit it with <see cref="EinsteinForm.Classical"/>, U = k_B T/(mω_E²) + U₀,
/// whose θ_E is the one a measured curve's quantum fit should approach at high temperature. χ² and the degrees of freedom
/// say how well the form fits: an anharmonic well bends U(T) away from it.
/// </remarks>
public static class EinsteinFit
{
    /// <summary>The model's U at <paramref name="kelvin"/> for θ_E = <paramref name="theta"/> and mass <paramref name="massAtomicMassUnits"/>, Å².</summary>
    /// <param name="theta">θ_E, K.</param>
    /// <param name="kelvin">T, K.</param>
    /// <param name="massAtomicMassUnits">m, u.</param>
    /// <param name="form">The quantum form or its classical limit.</param>
    public static double Model(double theta, double kelvin, double massAtomicMassUnits, EinsteinForm form = EinsteinForm.Quantum)
    {
        // ħ²/(2 m k_B θ) in Å²: ħ²/u in eV·Å², over 2 k_B θ in eV.
        double scale = PhysicalConstants.HbarSquaredOverAtomicMassElectronVoltAngstromSquared / (2 * massAtomicMassUnits * PhysicalConstants.BoltzmannElectronVoltPerKelvin * theta);
        return form == EinsteinForm.Classical ? scale * 2 * kelvin / theta : scale / Math.Tanh(theta / (2 * kelvin));
    }

    /// <summary>Fits θ_E (and, when <paramref name="withOffset"/>, a static offset U₀) to <paramref name="points"/>.</summary>
    /// <param name="points">At least 2 points (3 with an offset), distinct temperatures, positive standard errors.</param>
    /// <param name="mass">The vibrating atom's mass.</param>
    /// <param name="withOffset">Whether to fit a temperature-independent offset (static disorder) as well.</param>
    /// <param name="form">The quantum form (default) or its classical limit (for classically sampled curves).</param>
    /// <exception cref="ArgumentException">For too few points, a non-positive or non-finite error, or a curve no θ_E in 0.1 K to 10⁵ K fits.</exception>
    public static EinsteinFitResult Fit(IReadOnlyList<DisplacementPoint> points, Mass mass, bool withOffset = false, EinsteinForm form = EinsteinForm.Quantum)
    {
        Preconditions.CheckNotNull(points, nameof(points));
        double m = mass.InAtomicMassUnits;
        int parameters = withOffset ? 2 : 1;
        if (points.Count < parameters + 1)
        {
            throw new ArgumentException(string.Create(CultureInfo.InvariantCulture, $"points has {points.Count} entries; the fit needs at least {parameters + 1}."), nameof(points));
        }
        foreach (var p in points)
        {
            if (!(p.StandardError > 0) || !double.IsFinite(p.StandardError) || !double.IsFinite(p.IsotropicDisplacementInAngstromsSquared) || !(p.Temperature.InKelvin > 0))
            {
                throw new ArgumentException(string.Create(CultureInfo.InvariantCulture,
                    $"points has U = {p.IsotropicDisplacementInAngstromsSquared:R} ± {p.StandardError:R} Å² at {p.Temperature.InKelvin:R} K; U and T must be finite, T and the error positive."), nameof(points));
            }
        }
        var t = points.Select(p => p.Temperature.InKelvin).ToArray();
        var y = points.Select(p => p.IsotropicDisplacementInAngstromsSquared).ToArray();
        var w = points.Select(p => 1 / (p.StandardError * p.StandardError)).ToArray();
        double sumW = w.Sum();

        // χ²(θ) with the offset profiled out (for fixed θ it is the weighted mean of the residuals).
        (double ChiSquared, double Offset) Profile(double theta)
        {
            double offset = 0;
            if (withOffset)
            {
                for (int i = 0; i < t.Length; i++)
                {
                    offset += w[i] * (y[i] - Model(theta, t[i], m, form));
                }
                offset /= sumW;
            }
            double chi = 0;
            for (int i = 0; i < t.Length; i++)
            {
                double r = y[i] - Model(theta, t[i], m, form) - offset;
                chi += w[i] * r * r;
            }
            return (chi, offset);
        }
        // log θ on a coarse grid, then MathNet's bounded scalar minimiser around the best point.
        const double lower = -1, upper = 5; // log10 θ: 0.1 K to 10^5 K
        double best = lower, bestChi = double.PositiveInfinity;
        for (int i = 0; i <= 600; i++)
        {
            double lt = lower + (upper - lower) * i / 600;
            double c = Profile(Math.Pow(10, lt)).ChiSquared;
            if (c < bestChi)
            {
                (best, bestChi) = (lt, c);
            }
        }
        double step = (upper - lower) / 600;
        double logTheta = MathNet.Numerics.FindMinimum.OfScalarFunctionConstrained(lt => Profile(Math.Pow(10, lt)).ChiSquared,
            Math.Max(lower, best - step), Math.Min(upper, best + step), 1e-12, 1000);
        double theta = Math.Pow(10, logTheta);
        if (logTheta <= lower + 1e-6 || logTheta >= upper - 1e-6)
        {
            throw new ArgumentException(string.Create(CultureInfo.InvariantCulture,
                $"No Einstein temperature between 0.1 K and 100 000 K fits these points (the best lies at the edge, {theta:G3} K): the curve is not of the Einstein form."), nameof(points));
        }
        var (chiMin, offsetFit) = Profile(theta);
        // σ_θ from the profile's curvature: Δχ² = 1 at one standard error, χ²(θ) ≈ χ²_min + (θ − θ̂)²/σ².
        double h = theta * 1e-4;
        double curvature = (Profile(theta + h).ChiSquared - 2 * chiMin + Profile(theta - h).ChiSquared) / (h * h);
        double thetaSe = curvature > 0 ? Math.Sqrt(2 / curvature) : double.PositiveInfinity;
        double offsetSe = withOffset ? Math.Sqrt(1 / sumW) : 0;
        return new EinsteinFitResult(theta, thetaSe, offsetFit, offsetSe, chiMin, t.Length - parameters);
    }
}
