using System;
using System.Collections.Generic;
using System.Globalization;
using System.Linq;
using ThermalSampling.Potentials;
using ThermalSampling.Reports;

namespace ThermalSampling.Testing;

/// <summary>Thrown by <see cref="StatisticalAssert"/> when a check fails; the message says what was compared and by how much it missed.</summary>
public sealed class StatisticalAssertionException : Exception
{
    /// <summary>Creates the exception.</summary>
    /// <param name="message">What failed.</param>
    public StatisticalAssertionException(string message) : base(message) { }
}

/// <summary>
/// Assertions for statistical results, usable from xunit, NUnit, MSTest or plain code: each throws
/// <see cref="StatisticalAssertionException"/> on failure. False-alarm rates assume the error bars are honest (normal
/// errors, correct standard errors): |z| &gt; 3 happens in 0.27% of correct runs, |z| &gt; 4 in 0.0063%, |z| &gt; 5 in
/// 5.7e-5 %. With many checks per suite, use 4 or more and fixed seeds.
/// </summary>
public static class StatisticalAssert
{
    /// <summary>The two-sided false-alarm probability of a |z| &gt; k test for a correct result, 2(1 − Φ(k)).</summary>
    /// <param name="k">The threshold in standard errors, positive.</param>
    public static double FalseAlarmRate(double k)
    {
        if (!(k > 0) || !double.IsFinite(k))
        {
            throw new ArgumentOutOfRangeException(nameof(k), k, "k must be finite and greater than 0.");
        }
        return MathNet.Numerics.SpecialFunctions.Erfc(k / Math.Sqrt(2));
    }

    /// <summary>Passes when |estimate − reference| ≤ k·SE.</summary>
    /// <param name="estimate">The sampled value and its standard error.</param>
    /// <param name="reference">The reference value.</param>
    /// <param name="k">Allowed standard errors (default 4: false-alarm rate 6.3e-5).</param>
    /// <param name="what">A name for the message.</param>
    public static void AgreesWithin(Estimate estimate, double reference, double k = 4, string what = "value")
    {
        ArgumentNullException.ThrowIfNull(estimate);
        CheckK(k);
        if (!double.IsFinite(reference))
        {
            throw new ArgumentOutOfRangeException(nameof(reference), reference, "reference must be finite.");
        }
        double z = estimate.ZScore(reference);
        if (!(Math.Abs(z) <= k))
        {
            throw new StatisticalAssertionException(string.Create(CultureInfo.InvariantCulture,
                $"{what}: sampled {estimate.ToRoundedString()} differs from the reference {reference:G6} by {z:G3} standard errors (allowed {k:G3}; a correct run fails this in {FalseAlarmRate(k):P4} of cases)."));
        }
    }

    /// <summary>Passes when two independent estimates agree: |a − b| ≤ k·√(SE_a² + SE_b²).</summary>
    /// <param name="first">One estimate.</param>
    /// <param name="second">The other, independent of the first (different seeds).</param>
    /// <param name="k">Allowed combined standard errors (default 4).</param>
    /// <param name="what">A name for the message.</param>
    public static void RunsAgree(Estimate first, Estimate second, double k = 4, string what = "value")
    {
        ArgumentNullException.ThrowIfNull(first);
        ArgumentNullException.ThrowIfNull(second);
        CheckK(k);
        double se = Math.Sqrt(first.StandardError * first.StandardError + second.StandardError * second.StandardError);
        double z = se > 0 ? (first.Value - second.Value) / se : first.Value == second.Value ? 0 : double.PositiveInfinity;
        if (!(Math.Abs(z) <= k))
        {
            throw new StatisticalAssertionException(string.Create(CultureInfo.InvariantCulture,
                $"{what}: the runs give {first.ToRoundedString()} and {second.ToRoundedString()}, {z:G3} combined standard errors apart (allowed {k:G3})."));
        }
    }

    /// <summary>
    /// Kolmogorov–Smirnov test of independent draws against a CDF; passes when the p-value (asymptotic Kolmogorov
    /// distribution, accurate for n ≳ 35) is at least <paramref name="alpha"/>, so a correct sampler fails with probability alpha.
    /// Correlated draws (Metropolis) must be thinned well beyond their autocorrelation time first.
    /// </summary>
    /// <param name="draws">At least 35 finite draws.</param>
    /// <param name="cdf">The reference CDF.</param>
    /// <param name="alpha">The false-alarm rate, in (0, 0.5]; default 0.001.</param>
    /// <returns>The p-value.</returns>
    public static double PassesKolmogorovSmirnov(IReadOnlyCollection<double> draws, Func<double, double> cdf, double alpha = 1e-3)
    {
        ArgumentNullException.ThrowIfNull(draws);
        ArgumentNullException.ThrowIfNull(cdf);
        if (!(alpha > 0 && alpha <= 0.5))
        {
            throw new ArgumentOutOfRangeException(nameof(alpha), alpha, "alpha must be in (0, 0.5].");
        }
        if (draws.Count < 35)
        {
            throw new ArgumentException($"draws has {draws.Count} values; the asymptotic Kolmogorov–Smirnov test needs at least 35.", nameof(draws));
        }
        var sorted = draws.ToArray();
        if (sorted.Any(x => !double.IsFinite(x)))
        {
            throw new ArgumentException("draws contains a value that is not finite.", nameof(draws));
        }
        Array.Sort(sorted);
        int n = sorted.Length;
        double d = 0;
        for (int i = 0; i < n; i++)
        {
            double f = cdf(sorted[i]);
            d = Math.Max(d, Math.Max((i + 1.0) / n - f, f - (double)i / n));
        }
        double p = KolmogorovSurvival(d * Math.Sqrt(n));
        if (p < alpha)
        {
            throw new StatisticalAssertionException(string.Create(CultureInfo.InvariantCulture,
                $"Kolmogorov–Smirnov: distance {d:G4} over {n} draws, p = {p:G3} < alpha = {alpha:G3}: the draws do not follow the reference distribution."));
        }
        return p;
    }

    /// <summary>P(√n D &gt; x) for the Kolmogorov distribution, 2Σ(−1)^(k−1) e^(−2k²x²) (the large-n limit of the KS statistic).</summary>
    /// <param name="x">√n times the KS distance.</param>
    public static double KolmogorovSurvival(double x)
    {
        if (x < 0.2)
        {
            return 1;
        }
        double sum = 0;
        for (int k = 1; k <= 100; k++)
        {
            double term = Math.Exp(-2.0 * k * k * x * x);
            sum += (k % 2 == 1 ? 1 : -1) * term;
            if (term < 1e-16)
            {
                break;
            }
        }
        return Math.Clamp(2 * sum, 0, 1);
    }

    /// <summary>
    /// Passes when the potential's first, second and third derivatives match central finite differences of the order
    /// below at <paramref name="points"/> separations across [lower, upper], within a relative tolerance.
    /// </summary>
    /// <typeparam name="TPotential">The potential type.</typeparam>
    /// <param name="potential">The potential, for example a fitted table or a user-supplied delegate with analytic derivatives.</param>
    /// <param name="lower">Lowest separation checked, Å.</param>
    /// <param name="upper">Highest separation checked, Å.</param>
    /// <param name="points">Number of separations, at least 2.</param>
    /// <param name="relativeTolerance">Allowed error relative to a scale built from all derivative magnitudes (default 1e-5).</param>
    public static void DerivativesMatchFiniteDifferences<TPotential>(TPotential potential, double lower, double upper, int points = 25, double relativeTolerance = 1e-5)
        where TPotential : struct, IPairPotential
    {
        if (!(lower > 0 && upper > lower) || !double.IsFinite(upper))
        {
            throw new ArgumentException(string.Create(CultureInfo.InvariantCulture, $"[lower, upper] = [{lower:R}, {upper:R}] must be a finite range above 0."), nameof(lower));
        }
        if (points < 2)
        {
            throw new ArgumentOutOfRangeException(nameof(points), points, "points must be at least 2.");
        }
        for (int i = 0; i < points; i++)
        {
            double r = lower + (upper - lower) * i / (points - 1);
            double h = 1e-4 * r;
            var d = potential.Derivatives(r);
            double[] analytic = { d.First, d.Second, d.Third };
            Func<double, double>[] lowerOrder = { potential.Energy, x => potential.Derivatives(x).First, x => potential.Derivatives(x).Second };
            double scale = Math.Abs(d.First) + Math.Abs(d.Second) * r + Math.Abs(d.Third) * r * r + Math.Abs(d.Fourth) * r * r * r;
            for (int n = 0; n < 3; n++)
            {
                var f = lowerOrder[n];
                double fd = (f(r - 2 * h) - 8 * f(r - h) + 8 * f(r + h) - f(r + 2 * h)) / (12 * h);
                double tolerance = relativeTolerance * scale / Math.Pow(r, n);
                if (!(Math.Abs(fd - analytic[n]) <= tolerance))
                {
                    throw new StatisticalAssertionException(string.Create(CultureInfo.InvariantCulture,
                        $"{potential.Description}: derivative {n + 1} at r = {r:G6} Å is {analytic[n]:G8} but finite differences give {fd:G8} (tolerance {tolerance:G3})."));
                }
            }
        }
    }

    /// <summary>Passes when the potential's minimum lies at r_min and its depth (ε for Lennard-Jones) is as given, within the given tolerances.</summary>
    /// <typeparam name="TPotential">The potential type.</typeparam>
    /// <param name="potential">The potential, for example a fit to reference energies.</param>
    /// <param name="equilibriumDistance">The expected r0, Å.</param>
    /// <param name="wellDepth">The expected depth −V(r_min) (ε for Lennard-Jones), eV.</param>
    /// <param name="distanceTolerance">Allowed |Δr0|, Å.</param>
    /// <param name="depthTolerance">Allowed |Δu0|, eV.</param>
    public static void HasMinimumAt<TPotential>(TPotential potential, double equilibriumDistance, double wellDepth, double distanceTolerance, double depthTolerance)
        where TPotential : struct, IPairPotential
    {
        var well = potential.Well ?? throw new StatisticalAssertionException($"{potential.Description} has no minimum.");
        double dr = well.EquilibriumDistanceInAngstroms - equilibriumDistance, du = -well.MinimumEnergyInElectronVolts - wellDepth;
        if (!(Math.Abs(dr) <= distanceTolerance) || !(Math.Abs(du) <= depthTolerance))
        {
            throw new StatisticalAssertionException(string.Create(CultureInfo.InvariantCulture,
                $"{potential.Description}: minimum at {well.EquilibriumDistanceInAngstroms:G6} Å with depth {-well.MinimumEnergyInElectronVolts:G6} eV; expected {equilibriumDistance:G6} ± {distanceTolerance:G3} Å and {wellDepth:G6} ± {depthTolerance:G3} eV."));
        }
    }

    private static void CheckK(double k)
    {
        if (!(k > 0) || !double.IsFinite(k))
        {
            throw new ArgumentOutOfRangeException(nameof(k), k, "k must be finite and greater than 0.");
        }
    }
}
