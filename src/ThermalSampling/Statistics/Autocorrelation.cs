using System;
using System.Globalization;
using System.Numerics;
using System.Runtime.Intrinsics;
using MathNet.Numerics.IntegralTransforms;
using ThermalSampling.Internal;

namespace ThermalSampling.Statistics;

/// <summary>
/// The integrated autocorrelation time τ = 1 + 2Σ_{t≥1} ρ(t) of a series (the convention in which independent draws
/// have τ = 1 and the effective sample size is N/τ), with a reliability flag and, when unreliable, the reason.
/// </summary>
/// <param name="IntegratedTime">τ, in steps (at least 1 is not enforced: anticorrelated series can give less).</param>
/// <param name="StandardError">Sokal's estimate of the statistical error of τ, τ·√(2(2M + 1)/N).</param>
/// <param name="Window">The summation window M chosen by Sokal's automatic rule M ≥ c·τ(M).</param>
/// <param name="SampleCount">N, the length of the series.</param>
/// <param name="IsReliable">Whether N ≥ 50 τ and a window was found.</param>
/// <param name="Reason">Why the estimate is unreliable, in plain words; empty when reliable.</param>
public sealed record AutocorrelationEstimate(double IntegratedTime, double StandardError, int Window, int SampleCount, bool IsReliable, string Reason)
{
    /// <summary>N/τ, the number of independent draws the series is worth.</summary>
    public double EffectiveSampleSize => SampleCount / Math.Max(IntegratedTime, 1e-300);
}

/// <summary>Autocorrelation analysis of one series.</summary>
public static class Autocorrelation
{
    /// <summary>The chain must be at least this many autocorrelation times long for the estimate to count as reliable (Sokal 1997).</summary>
    public const double MinimumLengthInAutocorrelationTimes = 50;

    /// <summary>The normalised autocorrelation function ρ(t), t = 0 … N − 1, by FFT (MathNet.Numerics), zero-padded so it is not circular.</summary>
    /// <param name="series">The series; at least 2 values, all finite.</param>
    public static double[] Function(ReadOnlySpan<double> series) => Function(Centred(series, out _));

    /// <summary>The series minus its mean, checked (at least 2 values, all finite); <paramref name="sumOfSquares"/> is Σ(x − x̄)².</summary>
    private static double[] Centred(ReadOnlySpan<double> series, out double sumOfSquares)
    {
        int n = series.Length;
        if (n < 2)
        {
            throw new ArgumentException(string.Create(CultureInfo.InvariantCulture, $"series has {n} values; at least 2 are needed."), nameof(series));
        }
        double mean = 0;
        for (int i = 0; i < n; i++)
        {
            Preconditions.CheckFinite(series[i], "series");
            mean += series[i];
        }
        mean /= n;
        var d = new double[n];
        sumOfSquares = 0;
        for (int i = 0; i < n; i++)
        {
            d[i] = series[i] - mean;
            sumOfSquares += d[i] * d[i];
        }
        return d;
    }

    private static double[] Function(double[] centred)
    {
        int n = centred.Length;
        int size = 1;
        while (size < 2 * n)
        {
            size <<= 1;
        }
        var data = new Complex[size];
        for (int i = 0; i < n; i++)
        {
            data[i] = new Complex(centred[i], 0);
        }
        Fourier.Forward(data, FourierOptions.NoScaling);
        for (int i = 0; i < size; i++)
        {
            double m = data[i].Magnitude;
            data[i] = new Complex(m * m, 0);
        }
        Fourier.Inverse(data, FourierOptions.NoScaling);
        var rho = new double[n];
        double c0 = data[0].Real;
        if (!(c0 > 0))
        {
            rho[0] = 1;
            return rho; // a constant series: no correlation structure to speak of
        }
        for (int t = 0; t < n; t++)
        {
            rho[t] = data[t].Real / c0;
        }
        return rho;
    }

    /// <summary>
    /// τ by Sokal's automatic windowing (Sokal, NATO ASI Series B 361 (1997)): the smallest M with M ≥ c·τ(M),
    /// τ(M) = 1 + 2Σ_{t=1}^{M} ρ(t).
    /// </summary>
    /// <param name="series">The series; at least 2 values, all finite.</param>
    /// <param name="windowFactor">c, 1 to 20; 5 is the usual choice (some use up to 7).</param>
    public static AutocorrelationEstimate Estimate(ReadOnlySpan<double> series, double windowFactor = 5)
    {
        Preconditions.CheckRange(windowFactor, 1, 20, nameof(windowFactor));
        // Short windows are the common case: sum the first lags directly (O(N·M), no FFT buffers), and
        // fall back to the FFT autocorrelation only when the window has not closed by DirectLags. Both give the same ρ(t).
        const int DirectLags = 256;
        var d = Centred(series, out double c0);
        int n = d.Length;
        double tau = 1;
        int window = 0;
        bool found = false;
        // A series of identical values is constant even when c0 is not exactly 0: its computed mean can be off by an ulp,
        // and the deviations that leaves all have one sign, which would read as perfect correlation.
        bool constant = true;
        for (int i = 1; i < series.Length && constant; i++)
        {
            constant = series[i] == series[0];
        }
        if (c0 > 0 && !constant)
        {
            int direct = Math.Min(DirectLags, n - 1);
            for (int m = 1; m <= direct && !found; m++)
            {
                double c = LagProduct(d, m);
                tau += 2 * c / c0;
                if (m >= windowFactor * tau)
                {
                    window = m;
                    found = true;
                }
            }
            if (!found && direct < n - 1)
            {
                var rho = Function(d);
                for (int m = direct + 1; m < n; m++)
                {
                    tau += 2 * rho[m];
                    if (m >= windowFactor * tau)
                    {
                        window = m;
                        found = true;
                        break;
                    }
                }
            }
        }
        else
        {
            found = true; // a constant series: nothing is correlated
            window = 1;
        }
        if (!found)
        {
            window = n - 1;
        }
        double error = Math.Abs(tau) * Math.Sqrt(2.0 * (2 * window + 1) / n);
        string reason = "";
        if (!found)
        {
            reason = string.Create(CultureInfo.InvariantCulture,
                $"No summation window satisfied M >= {windowFactor:G3}·tau within the {n} values: the series is far too short for its correlation time. Run longer.");
        }
        else if (n < MinimumLengthInAutocorrelationTimes * tau)
        {
            reason = string.Create(CultureInfo.InvariantCulture,
                $"The series is only {n / tau:G3} autocorrelation times long (tau = {tau:G4}); at least {MinimumLengthInAutocorrelationTimes:G3} are needed for a trustworthy tau and error bar. Run about {Math.Ceiling(MinimumLengthInAutocorrelationTimes * tau / n):G3} times longer.");
        }
        return new AutocorrelationEstimate(Math.Max(tau, 1.0 / n), error, window, n, reason.Length == 0, reason);
    }

    /// <summary>
    /// Σ_i d[i]·d[i + m], with eight partial sums in two 256-bit registers (and a scalar tail), in a fixed order: the
    /// same bits on every machine. Hand-written because it is the diagnostics' hot loop (each report sums up to 256 lags
    /// over every chain's batch means); the single-accumulator loop was latency-bound at one add per four cycles.
    /// </summary>
    private static double LagProduct(double[] d, int m)
    {
        int n = d.Length - m, i = 0;
        var a = Vector256<double>.Zero;
        var b = a;
        ref double x = ref System.Runtime.InteropServices.MemoryMarshal.GetArrayDataReference(d);
        ref double y = ref System.Runtime.CompilerServices.Unsafe.Add(ref x, m);
        for (; i + 8 <= n; i += 8)
        {
            a += Vector256.LoadUnsafe(ref x, (nuint)i) * Vector256.LoadUnsafe(ref y, (nuint)i);
            b += Vector256.LoadUnsafe(ref x, (nuint)(i + 4)) * Vector256.LoadUnsafe(ref y, (nuint)(i + 4));
        }
        var sum = a + b;
        double c = (sum.GetElement(0) + sum.GetElement(1)) + (sum.GetElement(2) + sum.GetElement(3));
        for (; i < n; i++)
        {
            c += d[i] * d[i + m];
        }
        return c;
    }
}
