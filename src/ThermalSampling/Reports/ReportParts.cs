using System;
using System.Collections.Generic;
using System.Collections.Immutable;
using System.Globalization;
using System.Linq;
using ThermalSampling.Reports;
using ThermalSampling.Analysis;
using ThermalSampling.Statistics;

namespace ThermalSampling.Reports;

/// <summary>
/// The summarising step's building blocks: turns the engine's per-chain records (bin counts, retained draws, covariance
/// sums, diagnostics) into the immutable pieces of a report. Records know nothing of reports; this is the one place
/// that knows both.
/// </summary>
internal static class ReportParts
{
    /// <summary>
    /// The mean potential energy above <paramref name="floor"/> (the minimum's energy; the stores' reference when null),
    /// with its standard error from the chains' energy batch means, and the energy's variance. The batches are equal, so the
    /// mean of the batch means is the mean of the batched draws.
    /// </summary>
    internal static (Estimate Mean, double Variance) PotentialEnergy(IReadOnlyList<BatchMeansStore> stores, int batch, long samples, double? floor)
    {
        var means = stores.Select(s => s.Means()).ToList();
        double reference = stores[0].Reference;
        double mean = means.SelectMany(m => m).DefaultIfEmpty(double.NaN).Average();
        double variance = Math.Max(0, stores.SelectMany(s => s.Second).DefaultIfEmpty(double.NaN).Average() - Math.Pow(mean - reference, 2));
        var summary = ChainDiagnostics.Summarise(means, batch, samples, variance, withRHat: false);
        return (new Estimate(mean - (floor ?? reference), Math.Sqrt(variance / Math.Max(summary.Ess, 1))), variance);
    }

    /// <summary>The share by which a first-order estimate may differ from the exact or sampled value before it is called outside its range.</summary>
    internal const double FirstOrderTolerance = 0.2;

    /// <summary>
    /// The perturbation-invalid warning when the first-order <paramref name="what"/> differs from the reference (exact, or
    /// sampled with standard error <paramref name="standardError"/>) by more than 4 standard errors plus 20 % of the reference.
    /// </summary>
    internal static Warning? FirstOrderCheck(string what, double firstOrder, double reference, double standardError)
    {
        double gap = Math.Abs(firstOrder - reference);
        if (!(gap > FirstOrderTolerance * Math.Abs(reference) + 4 * standardError))
        {
            return null;
        }
        return new Warning(WarningCodes.PerturbationInvalid, string.Create(CultureInfo.InvariantCulture,
            $"The first-order {what} ({firstOrder:G3}) differs from the {(standardError > 0 ? "sampled" : "exact")} one ({reference:G3}) by {gap / Math.Abs(reference):P0}, more than the {FirstOrderTolerance:P0} allowed: the anharmonic correction is not small at this temperature, so first-order perturbation theory is outside its range. Use the {(standardError > 0 ? "sampled" : "exact")} value."));
    }

    /// <summary>
    /// T(q) at every recorded scattering vector: sampled from the chains' groups, beside the harmonic Gaussian
    /// exp(−½ qᵀU_h q) (<paramref name="harmonicQuadratic"/> gives qᵀU_h q, or null without a harmonic estimate) and the
    /// exact value where <paramref name="exact"/> gives one.
    /// </summary>
    internal static ImmutableArray<TemperatureFactorPoint> TemperatureFactors(IReadOnlyList<CumulantSums> chains, Func<double[], double?> harmonicQuadratic,
        Func<double[], (double Real, double Imaginary)?> exact)
    {
        if (TemperatureFactorEstimate.From(chains) is not { } t)
        {
            return [];
        }
        int d = chains[0].Coordinates;
        var waves = chains[0].Waves.ToArray();
        var points = ImmutableArray.CreateBuilder<TemperatureFactorPoint>(t.Real.Length);
        for (int k = 0; k < t.Real.Length; k++)
        {
            var q = waves[(k * d)..((k + 1) * d)];
            var e = exact(q);
            points.Add(new TemperatureFactorPoint([.. q], new Estimate(t.Real[k], t.RealStandardError[k]), new Estimate(t.Imaginary[k], t.ImaginaryStandardError[k]),
                harmonicQuadratic(q) is double h ? Math.Exp(-0.5 * h) : null, t.Gaussian[k], new Estimate(t.Departure[k], t.DepartureStandardError[k]),
                e?.Real, e?.Imaginary));
        }
        return points.MoveToImmutable();
    }

    /// <summary>The warnings without the classical-validity ones about quantum effects (a path integral's own report states those with its quantum numbers).</summary>
    internal static ImmutableArray<Warning> WithoutQuantumAdvice(IEnumerable<Warning> warnings)
        => [.. warnings.Where(w => w.Code is not (WarningCodes.QuantumEffects or WarningCodes.DeBroglieWavelength))];

    /// <summary>
    /// The warnings with the quantum-effects one giving <paramref name="verdict"/> (the exact quantum number, or why there is
    /// none) in place of its advice to use an estimate; a quantum-effects warning with the verdict is added first when only
    /// the de Broglie one was raised.
    /// </summary>
    internal static ImmutableArray<Warning> WithQuantumVerdict(ImmutableArray<Warning> warnings, string verdict)
    {
        var reworded = warnings.Select(w => w.Code == WarningCodes.QuantumEffects ? new Warning(w.Code, w.Message.Replace(ClassicalValidity.QuantumAdvice, " " + verdict, StringComparison.Ordinal)) : w).ToList();
        if (!reworded.Any(w => w.Code == WarningCodes.QuantumEffects))
        {
            reworded.Insert(0, new Warning(WarningCodes.QuantumEffects, verdict));
        }
        return [.. reworded];
    }

    /// <summary>The bins of every chain as one density with per-bin standard errors √(p(1 − p)/ESS)/width.</summary>
    internal static Histogram Histogram(IReadOnlyList<BinCounter> parts, double effectiveSampleSize)
    {
        var first = parts[0];
        int bins = first.Counts.Length;
        var counts = new long[bins];
        foreach (var p in parts)
        {
            for (int i = 0; i < bins; i++)
            {
                counts[i] += p.Counts[i];
            }
        }
        return Density(counts, counts.Sum(), first.Lower, first.Upper, effectiveSampleSize);
    }

    /// <summary>
    /// Counts over equal bins from <paramref name="lower"/> to <paramref name="upper"/> as a density of all
    /// <paramref name="total"/> draws (draws outside the bins count in the total), with standard errors √(p(1 − p)/ESS)/width.
    /// </summary>
    internal static Histogram Density(ReadOnlySpan<long> counts, long total, double lower, double upper, double effectiveSampleSize)
    {
        var (density, error) = Densities(counts, total, (upper - lower) / counts.Length, effectiveSampleSize);
        return new Histogram(lower, upper, density, error, total);
    }

    /// <summary>The densities and their standard errors of counts in cells of equal size <paramref name="cell"/> (length or area).</summary>
    internal static (ImmutableArray<double> Density, ImmutableArray<double> Error) Densities(ReadOnlySpan<long> counts, long total, double cell, double effectiveSampleSize)
    {
        var density = ImmutableArray.CreateBuilder<double>(counts.Length);
        var error = ImmutableArray.CreateBuilder<double>(counts.Length);
        double ess = Math.Max(effectiveSampleSize, 1);
        for (int i = 0; i < counts.Length; i++)
        {
            double p = total > 0 ? (double)counts[i] / total : 0;
            density.Add(p / cell);
            // An empty (or nearly empty) bin is not known to hold nothing: its error is at least that of half an
            // effective draw, so that a density compared with it is not held to zero.
            double pe = total > 0 ? Math.Max(p, 0.5 / ess) : 0;
            error.Add(Math.Sqrt(pe * (1 - pe) / ess) / cell);
        }
        return (density.MoveToImmutable(), error.MoveToImmutable());
    }

    /// <summary>The retained draws of every chain, in chain order; <see cref="RetainedDraws{T}.None"/> when none were kept.</summary>
    internal static RetainedDraws<T> Draws<T>(IEnumerable<DrawRecorder<T>> chains) where T : struct
    {
        var list = chains.Select(c => c.ToImmutable()).ToImmutableArray();
        return list.All(c => c.IsEmpty) ? RetainedDraws<T>.None : new RetainedDraws<T>(list);
    }

    internal static void AddConvergenceWarnings(ImmutableArray<Warning>.Builder warnings, ChainDiagnostics.Summary s, double? acceptance, double? target)
    {
        var c = System.Globalization.CultureInfo.InvariantCulture;
        if (s.RHat is double r && r > RHat.Threshold)
        {
            warnings.Add(new Warning(WarningCodes.RHatHigh, string.Format(c,
                "R-hat = {0:G4} is above {1}: the chains disagree, so they have not converged to one distribution (or the particle is trapped in different wells). Run longer, or check for several minima.",
                r, RHat.Threshold)));
        }
        if (s.Ess < 400)
        {
            warnings.Add(new Warning(WarningCodes.LowEffectiveSampleSize, string.Format(c,
                "The effective sample size is {0:G3}, below 400: the error bars themselves are uncertain. Run more or longer chains.", s.Ess)));
        }
        if (!s.AllReliable)
        {
            warnings.Add(new Warning(WarningCodes.ShortChain, s.Reason));
        }
        if (acceptance is double a && target is double t && Math.Abs(a - t) > 0.15)
        {
            warnings.Add(new Warning(WarningCodes.AcceptanceOffTarget, string.Format(c,
                "The acceptance rate is {0:P1}, far from the target {1:P0}: the proposal width was not tuned well during burn-in (burn-in too short, or walls close to the particle). The results are still valid but less efficient.",
                a, t)));
        }
    }
}
