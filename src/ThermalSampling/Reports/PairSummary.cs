using System;
using System.Collections.Immutable;
using System.Globalization;
using System.Linq;
using ThermalSampling.Analysis;
using ThermalSampling.Internal;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Randomness;
using ThermalSampling.Sampling;
using ThermalSampling.Statistics;
using ThermalSampling.Units;

namespace ThermalSampling.Reports;

/// <summary>The summarising step for pairs: merges the chains' records in chain order and builds the report users read.</summary>
internal static class PairSummary
{
    /// <summary>The analyses a pair report sets beside the sampled numbers.</summary>
    internal sealed record References(ExactPairDistribution Exact, PotentialWell? Well, PairHarmonicEstimate? Harmonic, PairFirstOrderEstimate? FirstOrder,
        ImmutableArray<Warning> Warnings);

    /// <summary>The exact, harmonic and first-order references, with a warning instead of the latter two when the minimum is outside the window.</summary>
    internal static References Analyse<TPotential>(PairLandscape<TPotential> landscape, Mass mass, Temperature temperature)
        where TPotential : struct, IPairPotential
    {
        var exact = ExactPairDistribution.Compute(landscape, temperature);
        try
        {
            var well = PairAnalysis.RequireWellInside(landscape);
            var firstOrder = PairAnalysis.FirstOrder(landscape, temperature);
            var check = ReportParts.FirstOrderCheck("shift", firstOrder.MeanShiftInAngstroms, exact.MeanInAngstroms - well.EquilibriumDistanceInAngstroms, 0)
                ?? ReportParts.FirstOrderCheck("variance", firstOrder.VarianceInAngstromsSquared, exact.VarianceInAngstromsSquared, 0);
            return new References(exact, well, PairAnalysis.Harmonic(landscape, mass, temperature), firstOrder, check is null ? [] : [check]);
        }
        catch (LandscapeException ex)
        {
            return new References(exact, null, null, null, [new Warning(WarningCodes.MinimumOutsideWindow, ex.Message)]);
        }
    }

    /// <summary>The classical-validity warnings of a pair at the RMS spread <paramref name="rms"/>, with the exact wall probability.</summary>
    internal static ImmutableArray<Warning> ValidityWarnings(Mass mass, Temperature temperature, References references, double rms)
        => ClassicalValidity.Assess(mass, temperature, rms, references.Harmonic?.QuantumToThermalRatio ?? 0,
            references.Well?.WellDepthInElectronVolts ?? double.PositiveInfinity, references.Exact.ProbabilityNearWalls).Warnings;

    /// <summary>What a run would warn about before it samples: the references' warnings and the validity checks at the exact spread.</summary>
    internal static ImmutableArray<Warning> Check<TPotential>(PairLandscape<TPotential> landscape, Mass mass, Temperature temperature)
        where TPotential : struct, IPairPotential
    {
        var references = Analyse(landscape, mass, temperature);
        return references.Warnings.AddRange(Verdict(landscape, mass, temperature, ValidityWarnings(mass, temperature, references, references.Exact.RmsInAngstroms),
            references.Exact).Warnings);
    }

    /// <summary>
    /// Where classical statistics fail (a quantum-effects or de Broglie warning), the exact quantum distribution on the same
    /// walls, and the quantum-effects warning reworded to give the right number beside the classical one; elsewhere the
    /// warnings as they are and no quantum answer.
    /// </summary>
    internal static (ImmutableArray<Warning> Warnings, QuantumPairDistribution? Quantum) Verdict<TPotential>(PairLandscape<TPotential> landscape, Mass mass,
        Temperature temperature, ImmutableArray<Warning> warnings, ExactPairDistribution classical)
        where TPotential : struct, IPairPotential
    {
        if (!warnings.Any(w => w.Code is WarningCodes.QuantumEffects or WarningCodes.DeBroglieWavelength))
        {
            return (warnings, null);
        }
        var quantum = QuantumPairDistribution.Compute(landscape, mass, temperature);
        double ratio = quantum.RmsInAngstroms / classical.RmsInAngstroms;
        string verdict = string.Create(CultureInfo.InvariantCulture,
            $"Classical statistics {(ratio >= 1 ? "underestimate" : "overestimate")} the spread by {Math.Abs(ratio - 1):P0} here: the exact quantum RMS spread on this window is {quantum.RmsInAngstroms:G4} Å (mean {quantum.MeanInAngstroms:G6} Å), against {classical.RmsInAngstroms:G4} Å classically (mean {classical.MeanInAngstroms:G6} Å); the report's QuantumExact has the quantum distribution{(quantum.Converged ? "" : ", whose grid did not converge to the requested precision")}.");
        return (ReportParts.WithQuantumVerdict(warnings, verdict), quantum);
    }

    /// <summary>
    /// The report of one temperature from its run record. For the record of a path integral's ring polymers
    /// (<paramref name="pathIntegral"/>), the classical-validity verdict and the comparison with the classical quadrature are
    /// left out: the path-integral report makes its own against the exact quantum values.
    /// </summary>
    internal static PairVibrationReport Summarise<TPotential>(PairLandscape<TPotential> landscape, Mass mass, Temperature temperature, SamplingSettings settings,
        References references, TemperatureRecord run, bool pathIntegral = false)
        where TPotential : struct, IPairPotential
    {
        var (exact, well, harmonic, firstOrder, _) = references;
        var warnings = references.Warnings.ToBuilder();
        var results = run.Chains;
        bool metropolis = run.Settings.Method == SamplingMethod.Metropolis;
        double target = run.TargetAcceptance;
        int chains = results.Length;
        var moments = results[0].Separation;
        for (int c = 1; c < chains; c++)
        {
            moments = MomentAccumulator.Merge(moments, results[c].Separation);
        }
        double mean = moments.Mean, variance = moments.Variance;
        int batch = results[0].Stores[0].BatchSize;
        var summary = ChainDiagnostics.Summarise(results.Select(r => r.Stores[0].Means()).ToList(), batch, settings.SamplesPerChain, variance);
        double varianceOfSquares = Math.Max(moments.CentralMoment4 - moments.CentralMoment2 * moments.CentralMoment2, 0);
        var summarySquared = ChainDiagnostics.Summarise(results.Select(r => r.Stores[0].SquaredDeviationMeans(mean)).ToList(), batch, settings.SamplesPerChain, varianceOfSquares, withRHat: false);
        double meanSe = Math.Sqrt(variance / summary.Ess);
        double varianceSe = Math.Sqrt(varianceOfSquares / summarySquared.Ess);
        double rms = Math.Sqrt(variance);
        double? acceptance = metropolis ? results.Sum(r => (double)r.Accepted) / ((double)chains * settings.SamplesPerChain) : null;

        var meanEstimate = new Estimate(mean, meanSe);
        var varianceEstimate = new Estimate(variance, varianceSe);
        double exactSigma = Math.Sqrt(exact.VarianceInAngstromsSquared);
        var comparison = new ExactComparison(exact.MeanInAngstroms, exact.VarianceInAngstromsSquared, exact.Skewness, exact.ExcessKurtosis, exact.ProbabilityNearWalls,
            meanEstimate.ZScore(exact.MeanInAngstroms), varianceEstimate.ZScore(exact.VarianceInAngstromsSquared),
            exact.Skewness * Math.Pow(exactSigma, 3), exact.ExcessKurtosis * Math.Pow(exactSigma, 4));
        var cumulants = CumulantEstimate.From(results.Select(r => r.Cumulants).ToList());

        var (validity, quantum) = pathIntegral
            ? (ReportParts.WithoutQuantumAdvice(ValidityWarnings(mass, temperature, references, exact.RmsInAngstroms)), null)
            : Verdict(landscape, mass, temperature, ValidityWarnings(mass, temperature, references, exact.RmsInAngstroms), exact);
        warnings.AddRange(validity); // at the exact spread, as validate uses
        ReportParts.AddConvergenceWarnings(warnings, summary, acceptance, metropolis ? target : null);
        if (!pathIntegral && (Math.Abs(comparison.ZScoreMean) > 4 || Math.Abs(comparison.ZScoreVariance) > 4))
        {
            warnings.Add(new Warning(WarningCodes.DisagreesWithExact, string.Create(CultureInfo.InvariantCulture,
                $"The sampled mean or variance differs from the exact quadrature value by more than 4 standard errors (z = {comparison.ZScoreMean:G3}, {comparison.ZScoreVariance:G3}): the chains are not converged or the error bars are too small. Trust the exact value.")));
        }

        var (potentialEnergy, energyVariance) = ReportParts.PotentialEnergy(results.Select(r => r.Energies).ToList(), batch, settings.SamplesPerChain,
            well?.MinimumEnergyInElectronVolts);

        var diagnostics = new SamplingDiagnostics(acceptance, summary.Tau, summary.Ess, summary.RHat, moments.Count, summary.BlockingStandardError,
            metropolis ? results.Average(r => r.ProposalScale) : null);
        var histogram = ReportParts.Histogram(results.Select(r => r.Bins).ToList(), summary.Ess);
        var (exactBins, harmonicBins) = BinDensities(histogram, exact, well, harmonic);
        var provenance = new Provenance(settings.Seed, RandomStream.GeneratorName, settings, Provenance.CurrentLibraryVersion, landscape.Description, mass);
        return new PairVibrationReport
        {
            Temperature = temperature,
            Geometry = landscape.Geometry,
            MinimumInAngstroms = well?.EquilibriumDistanceInAngstroms,
            Mean = meanEstimate,
            MeanShift = well is null ? null : new Estimate(mean - well.EquilibriumDistanceInAngstroms, meanSe),
            Variance = varianceEstimate,
            Rms = new Estimate(rms, rms > 0 ? varianceSe / (2 * rms) : 0),
            Skewness = moments.Skewness,
            PotentialEnergy = potentialEnergy,
            PotentialEnergyVarianceInElectronVoltsSquared = energyVariance,
            ExcessKurtosis = moments.ExcessKurtosis,
            ThirdCumulant = new Estimate(cumulants.Third[0], cumulants.ThirdStandardError[0]),
            FourthCumulant = new Estimate(cumulants.Fourth[0], cumulants.FourthStandardError[0]),
            Harmonic = harmonic,
            FirstOrder = firstOrder,
            Exact = comparison,
            Diagnostics = diagnostics,
            Histogram = histogram,
            ExactBinDensity = exactBins,
            QuantumExact = quantum,
            TemperatureFactors = ReportParts.TemperatureFactors(results.Select(r => r.Cumulants).ToList(),
                q => harmonic is null ? null : q[0] * q[0] * harmonic.ClassicalVarianceInAngstromsSquared, q => exact.TemperatureFactor(q[0])),
            HarmonicBinDensity = harmonicBins,
            Warnings = warnings.ToImmutable(),
            Provenance = provenance,
            Draws = ReportParts.Draws(results.Select(r => r.KeptSeparations)),
        };
    }

    /// <summary>
    /// The exact density and the harmonic Gaussian averaged over each of the histogram's bins: the probability in the bin
    /// over its width, by quadrature over the bin alone, and from the normal distribution about the minimum with the
    /// classical harmonic variance.
    /// </summary>
    private static (ImmutableArray<double> Exact, ImmutableArray<double> Harmonic) BinDensities(Histogram histogram, ExactPairDistribution exact,
        PotentialWell? well, PairHarmonicEstimate? harmonic)
    {
        int bins = histogram.Density.Length;
        double width = histogram.BinWidth;
        var exactBins = ImmutableArray.CreateBuilder<double>(bins);
        var harmonicBins = ImmutableArray.CreateBuilder<double>(harmonic is null ? 0 : bins);
        var gaussian = harmonic is null || well is null ? null
            : new MathNet.Numerics.Distributions.Normal(well.EquilibriumDistanceInAngstroms, Math.Sqrt(harmonic.ClassicalVarianceInAngstromsSquared));
        for (int i = 0; i < bins; i++)
        {
            double a = histogram.Lower + i * width, b = i == bins - 1 ? histogram.Upper : a + width;
            exactBins.Add(exact.ProbabilityBetween(a, b) / width);
            if (gaussian is not null)
            {
                harmonicBins.Add((gaussian.CumulativeDistribution(b) - gaussian.CumulativeDistribution(a)) / width);
            }
        }
        return (exactBins.MoveToImmutable(), harmonicBins.MoveToImmutable());
    }
}
