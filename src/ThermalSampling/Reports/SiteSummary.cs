using System;
using System.Collections.Generic;
using System.Collections.Immutable;
using System.Globalization;
using System.Linq;
using ThermalSampling.Analysis;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Randomness;
using ThermalSampling.Sampling;
using ThermalSampling.Statistics;
using ThermalSampling.Units;

namespace ThermalSampling.Reports;

/// <summary>The summarising step for sites: merges the chains' records in chain order and builds the report users read.</summary>
internal static class SiteSummary
{
    /// <summary>
    /// The classical-validity warnings of a site: quantum and de Broglie checks at the RMS spread <paramref name="rms"/>, the
    /// escape warning measured against the lowest way out of the site's basin, and (when known) the wall warning.
    /// </summary>
    internal static IEnumerable<Warning> ValidityWarnings(Mass mass, Temperature temperature, SiteHarmonicEstimate harmonic, SiteBasin basin, double rms,
        double? nearWalls)
    {
        double wayOut = basin.LowestWayOutInElectronVolts;
        var validity = ClassicalValidity.Assess(mass, temperature, rms, harmonic.Modes.Max(m => m.QuantumToThermalRatio),
            double.IsPositiveInfinity(wayOut) || wayOut > 0 ? wayOut : double.Epsilon, nearWalls);
        double band = Math.Sqrt(harmonic.ClassicalMeanSquareDisplacement / 3);
        return validity.Warnings.Select(w => w.Code switch
        {
            WarningCodes.EscapeRisk => SiteBasins.EscapeWarning(basin, temperature),
            // Name the site's own measure: the share of draws within one harmonic RMS spread of the confinement.
            WarningCodes.WallMass => new Warning(WarningCodes.WallMass, string.Create(CultureInfo.InvariantCulture,
                $"{nearWalls:P1} of the draws lie within one harmonic RMS spread ({band:G3} Å) of the confinement: the confinement, not only the potential, holds the particle, so the mean and spread depend on its size. Make it larger, or state it with the result.")),
            _ => w,
        });
    }

    /// <summary>What a run would warn about before it samples: the harmonic analysis (which refuses a saddle), the basin map and the validity checks at the harmonic spread.</summary>
    internal static ImmutableArray<Warning> Check<TPotential>(SiteLandscape<TPotential> landscape, Mass mass, Temperature temperature)
        where TPotential : struct, IPairPotential
    {
        var harmonic = SiteAnalysis.Harmonic(landscape, mass, temperature);
        var basin = SiteBasins.AtTemperature(SiteBasins.Map(landscape, harmonic.Minimum), landscape, temperature);
        return ValidityWarnings(mass, temperature, harmonic, basin, Math.Sqrt(harmonic.ClassicalMeanSquareDisplacement / 3), null).ToImmutableArray();
    }

    /// <summary>
    /// Where classical statistics fail (a quantum-effects or de Broglie warning), the exact quantum displacement tensor
    /// from the oscillator basis, and the quantum-effects warning reworded with the right number (or with why the
    /// temperature is too high for that reference); elsewhere the warnings as they are.
    /// </summary>
    internal static (ImmutableArray<Warning> Warnings, QuantumSite? Quantum) Verdict<TPotential>(SiteLandscape<TPotential> landscape, Mass mass,
        Temperature temperature, ImmutableArray<Warning> warnings, double classicalMsd)
        where TPotential : struct, IPairPotential
    {
        if (!warnings.Any(w => w.Code is WarningCodes.QuantumEffects or WarningCodes.DeBroglieWavelength))
        {
            return (warnings, null);
        }
        var quantum = QuantumSite.Compute(landscape, mass, temperature, out string? why);
        string verdict = quantum is null
            ? $"No exact quantum reference here: {why}."
            : string.Create(CultureInfo.InvariantCulture,
                $"Classical statistics {(quantum.MeanSquareDisplacementInAngstromsSquared >= classicalMsd ? "underestimate" : "overestimate")} the mean-square displacement by {Math.Abs(quantum.MeanSquareDisplacementInAngstromsSquared / classicalMsd - 1):P0} here: the exact quantum MSD (oscillator basis, {quantum.BasisSize} functions) is {quantum.MeanSquareDisplacementInAngstromsSquared:G4} Å², against {classicalMsd:G4} Å² sampled classically; the report's QuantumExact has the quantum tensor{(quantum.Converged ? "" : ", whose basis did not converge to the requested precision")}.");
        return (ReportParts.WithQuantumVerdict(warnings, verdict), quantum);
    }

    /// <summary>
    /// The report of one temperature from its run record. For the record of a path integral's ring polymers
    /// (<paramref name="pathIntegral"/>), the classical-validity verdict is left out: the path-integral report makes its own.
    /// </summary>
    internal static SiteVibrationReport Summarise<TPotential>(SiteLandscape<TPotential> landscape, Mass mass, Temperature temperature, SamplingSettings settings,
        SiteHarmonicEstimate harmonic, TemperatureRecord run, bool pathIntegral = false)
        where TPotential : struct, IPairPotential
    {
        var results = run.Chains;
        var min = harmonic.Minimum;
        int chains = results.Length;
        bool metropolis = run.Settings.Method == SamplingMethod.Metropolis;
        double target = run.TargetAcceptance;
        double sigmaMin = run.ProposalUnitInAngstroms;
        var moments = results[0].PositionMoments;
        for (int c = 1; c < chains; c++)
        {
            moments = CovarianceAccumulator.Merge(moments, results[c].PositionMoments);
        }
        var covariance = moments.Covariance();
        var mean = new Position(moments.MeanX, moments.MeanY, moments.MeanZ);
        double[] meanComponents = { mean.X, mean.Y, mean.Z };
        double[] variances = { covariance.XX, covariance.YY, covariance.ZZ };
        int batch = results[0].Stores[0].BatchSize;
        // The three axes' diagnostics (each a pooled rank sort for R-hat) are independent: run them side by side on the
        // run's threads; each lands in its own slot, so the report is the same for any thread count.
        var summaries = new ChainDiagnostics.Summary[3];
        System.Threading.Tasks.Parallel.For(0, 3, new System.Threading.Tasks.ParallelOptions { MaxDegreeOfParallelism = settings.MaxThreads ?? Environment.ProcessorCount },
            i => summaries[i] = ChainDiagnostics.Summarise(results.Select(r => r.Stores[i].Means()).ToList(), batch, settings.SamplesPerChain, variances[i]));
        var seMean = new Position(Math.Sqrt(variances[0] / summaries[0].Ess), Math.Sqrt(variances[1] / summaries[1].Ess), Math.Sqrt(variances[2] / summaries[2].Ess));
        var msdSeries = results.Select(r =>
        {
            var sx = r.Stores[0].SquaredDeviationMeans(meanComponents[0]);
            var sy = r.Stores[1].SquaredDeviationMeans(meanComponents[1]);
            var sz = r.Stores[2].SquaredDeviationMeans(meanComponents[2]);
            return sx.Select((v, i) => v + sy[i] + sz[i]).ToArray();
        }).ToList();
        double msd = covariance.Trace;
        double msdSe = ChainDiagnostics.PooledMeanStandardError(msdSeries);
        long draws = moments.Count;
        double acceptance = results.Sum(r => (double)r.Accepted) / results.Sum(r => (double)r.Proposals);
        double nearWalls = results.Sum(r => (double)r.DrawsNearWall) / draws; // share of draws within one harmonic RMS spread of the confinement

        var worst = summaries.OrderByDescending(s => s.Tau).First();
        var combined = new ChainDiagnostics.Summary(worst.Tau, summaries.Min(s => s.Ess), summaries[0].BlockingStandardError,
            summaries.All(s => s.AllReliable), summaries.Select(s => s.Reason).FirstOrDefault(r => r.Length > 0) ?? "",
            summaries.All(s => s.RHat is null) ? null : summaries.Max(s => s.RHat ?? 0));
        var warnings = ImmutableArray.CreateBuilder<Warning>();
        var basin = SiteBasins.AtTemperature(SiteBasins.Map(landscape, min), landscape, temperature);
        double outside = results.Sum(r => (double)r.DrawsOutsideBasin) / draws;
        bool staysAtSite = outside <= SiteBasins.LeftSiteThreshold;
        if (!staysAtSite)
        {
            warnings.Add(SiteBasins.LeftSiteWarning(basin, outside));
        }
        ImmutableArray<Warning> validityWarnings = [.. ValidityWarnings(mass, temperature, harmonic, basin, Math.Sqrt(Math.Max(msd, 1e-300) / 3), nearWalls)];
        var (validity, quantum) = pathIntegral ? (ReportParts.WithoutQuantumAdvice(validityWarnings), null) : Verdict(landscape, mass, temperature, validityWarnings, msd);
        warnings.AddRange(validity);
        if (staysAtSite && ReportParts.FirstOrderCheck("mean shift (length of the vector)", harmonic.FirstOrderMeanShift.Norm, (mean - min).Norm, seMean.Norm) is { } firstOrderWarning)
        {
            warnings.Add(firstOrderWarning);
        }
        ReportParts.AddConvergenceWarnings(warnings, combined, metropolis ? acceptance : null, metropolis ? target : null);

        var (potentialEnergy, energyVariance) = ReportParts.PotentialEnergy(results.Select(r => r.Energies).ToList(), batch,
            settings.SamplesPerChain, harmonic.MinimumEnergyInElectronVolts);
        var diagnostics = new SamplingDiagnostics(acceptance, combined.Tau, combined.Ess, combined.RHat, draws, combined.BlockingStandardError,
            metropolis ? results.Average(r => r.ProposalScale) * sigmaMin : null);
        var radialHistogram = ReportParts.Histogram(results.Select(r => r.Bins).ToList(), combined.Ess);
        var provenance = new Provenance(settings.Seed, RandomStream.GeneratorName, settings, Provenance.CurrentLibraryVersion, landscape.Description, mass);
        double b = DebyeWaller.FromIsotropicDisplacement(msd / 3);
        var cumulants = CumulantEstimate.From(results.Select(r => r.Cumulants).ToList());
        var symmetry = SiteSymmetry.Find(landscape, min);
        var symmetrised = CumulantEstimate.From(results.Select(r => r.Cumulants).ToList(), v => [.. symmetry.Symmetrise(v)]);
        var distribution = Distribution(results, combined.Ess);
        double beyond = distribution.ShareOutsideMarginals.Max();
        if (beyond > 1e-3)
        {
            warnings.Add(new Warning(WarningCodes.BeyondDistributionRange, string.Create(CultureInfo.InvariantCulture,
                $"{beyond:P2} of the draws fell beyond the distribution histograms' range (±{settings.SiteDistributionHalfWidthInSigmas:G4} harmonic standard deviations along an axis): the well is wider than its harmonic estimate, and the marginal and projected densities miss that share (widen them with SiteDistributionHalfWidthInSigmas, or output.siteRangeInSigmas in a scenario). The moments, cumulants and covariance use every draw.")));
        }
        return new SiteVibrationReport
        {
            Temperature = temperature,
            Minimum = min,
            Mean = mean,
            MeanStandardError = seMean,
            MeanShift = mean - min,
            Covariance = covariance,
            MeanSquareDisplacement = new Estimate(msd, msdSe),
            Perturbative = Perturbation.Site(landscape, min, harmonic.Hessian.ToMatrix().ToArray(), temperature),
            Symmetry = symmetry,
            Symmetrised = new SymmetrisedTensors(symmetry.PointGroup, symmetry.Operations.Length, symmetry.Symmetrise(covariance),
                Estimates(symmetrised.Third, symmetrised.ThirdStandardError), Estimates(symmetrised.Fourth, symmetrised.FourthStandardError)),
            ThirdCumulants = Estimates(cumulants.Third, cumulants.ThirdStandardError),
            FourthCumulants = Estimates(cumulants.Fourth, cumulants.FourthStandardError),
            PotentialEnergy = potentialEnergy,
            PotentialEnergyVarianceInElectronVoltsSquared = energyVariance,
            DebyeWallerB = staysAtSite ? new Estimate(b, b * msdSe / msd) : null,
            Harmonic = harmonic,
            QuantumExact = quantum,
            TemperatureFactors = ReportParts.TemperatureFactors(results.Select(r => r.Cumulants).ToList(),
                q => harmonic.ClassicalCovariance.Quadratic(new Position(q[0], q[1], q[2])), _ => null),
            Basin = basin,
            ShareOutsideBasin = outside,
            BasinPopulations = Populations(landscape, min, basin, results, temperature, combined.Ess),
            BasinPasses = SiteBasins.MapWithGrid(landscape, min).Grid.Passes,
            Diagnostics = diagnostics,
            RadialHistogram = radialHistogram,
            Distribution = distribution,
            Warnings = warnings.ToImmutable(),
            Provenance = provenance,
            Draws = ReportParts.Draws(results.Select(r => r.KeptPositions)),
        };
    }

    /// <summary>Each basin's sampled, harmonic and grid-quadrature population (<see cref="SiteVibrationReport.BasinPopulations"/>).</summary>
    private static ImmutableArray<BasinPopulation> Populations<TPotential>(SiteLandscape<TPotential> landscape, Position min, SiteBasin basin,
        IReadOnlyList<ChainRecord> results, Temperature temperature, double ess)
        where TPotential : struct, IPairPotential
    {
        var grid = SiteBasins.MapWithGrid(landscape, min).Grid;
        int labels = grid.LabelCount;
        long[] Counts(ChainRecord r)
        {
            var c = new long[labels];
            if (r.DrawsPerBasin.Length == labels)
            {
                r.DrawsPerBasin.CopyTo(c, 0);
            }
            else
            {
                c[0] = r.Draws;
            }
            return c;
        }
        var perChain = results.Select(Counts).ToList();
        double total = results.Sum(r => (double)r.Draws);
        var quadrature = grid.QuadratureShares(temperature.ThermalEnergyInElectronVolts);
        double harmonicTotal = 1 + basin.OtherMinima.Sum(m => m.HarmonicWeight ?? 0);
        bool wallUsed = quadrature[labels - 1] > 0 || perChain.Any(c => c[labels - 1] > 0);
        var list = ImmutableArray.CreateBuilder<BasinPopulation>();
        for (int l = 0; l < labels; l++)
        {
            bool wall = l == labels - 1 && labels - 1 > basin.OtherMinima.Length;
            if (wall && !wallUsed)
            {
                continue;
            }
            double p = perChain.Sum(c => (double)c[l]) / total;
            double se = Math.Sqrt(p * (1 - p) / Math.Max(ess, 1));
            if (perChain.Count >= 2)
            {
                var shares = perChain.Select((c, i) => c[l] / (double)results[i].Draws).ToList();
                double mean = shares.Average();
                se = Math.Max(se, Math.Sqrt(shares.Sum(x => (x - mean) * (x - mean)) / (shares.Count - 1) / shares.Count));
            }
            var other = l >= 1 && l <= basin.OtherMinima.Length ? basin.OtherMinima[l - 1] : null;
            list.Add(WithinBasin(new BasinPopulation(l, l == 0 ? min : other?.Position, l == 0 ? 0 : other?.EnergyAboveSiteInElectronVolts, new Estimate(p, se),
                l == 0 ? 1 / harmonicTotal : other?.HarmonicWeight is double w ? w / harmonicTotal : null, quadrature[l]), results, labels, min));
        }
        return list.ToImmutable();
    }

    /// <summary>
    /// Basin <paramref name="population"/>'s mean, covariance and mean-square displacement from the chains' per-basin sums
    /// (<see cref="ChainRecord.BasinSums"/>), with jackknife errors over the groups of draws that visited it; unchanged
    /// when the records hold no per-basin sums or no draw fell in the basin.
    /// </summary>
    private static BasinPopulation WithinBasin(BasinPopulation population, IReadOnlyList<ChainRecord> results, int labels, Position min)
    {
        const int groups = EnergyBinSums.Groups, size = ChainRecord.BasinSumValues;
        if (results.Any(r => r.BasinSums.Length != labels * groups * size))
        {
            return population;
        }
        int l = population.Index;
        if (results.All(r => Enumerable.Range(0, groups).All(g => r.BasinSums[(l * groups + g) * size] == 0)))
        {
            return population;
        }
        // Outputs: the mean displacement (3), the covariance about the mean (xx, yy, zz, xy, xz, yz), the MSD.
        var (values, errors, _) = GroupJackknife.Run(results.Count, groups, size, (c, g) => results[c].BasinSums.AsSpan((l * groups + g) * size, size), 10,
            (sums, into) =>
            {
                double n = sums[0], mx = sums[1] / n, my = sums[2] / n, mz = sums[3] / n;
                (into[0], into[1], into[2]) = (mx, my, mz);
                (into[3], into[4], into[5]) = (sums[4] / n - mx * mx, sums[5] / n - my * my, sums[6] / n - mz * mz);
                (into[6], into[7], into[8]) = (sums[7] / n - mx * my, sums[8] / n - mx * mz, sums[9] / n - my * mz);
                into[9] = into[3] + into[4] + into[5];
            });
        bool reliable = !double.IsNaN(errors[0]);
        return population with
        {
            Mean = new Position(min.X + values[0], min.Y + values[1], min.Z + values[2]),
            MeanStandardError = reliable ? new Position(errors[0], errors[1], errors[2]) : null,
            Covariance = new SymmetricTensor(values[3], values[4], values[5], values[6], values[7], values[8]),
            MeanSquareDisplacement = new Estimate(values[9], reliable ? errors[9] : double.NaN),
        };
    }

    /// <summary>The chains' distribution counts pooled into densities with standard errors from the effective sample size.</summary>
    private static SiteDistribution Distribution(IReadOnlyList<ChainRecord> results, double ess)
    {
        var frame = results[0].Shape!.Frame;
        var counts = new long[frame.Slots];
        foreach (var r in results)
        {
            for (int i = 0; i < counts.Length; i++)
            {
                counts[i] += r.Shape!.Counts[i];
            }
        }
        int n = frame.Bins;
        long total = counts.AsSpan(frame.MarginalBase(0), n + 2).ToArray().Sum();
        ess = Math.Min(ess, total); // Metropolis chains count every few draws: never more effective draws than counted
        double Share(long c) => total > 0 ? (double)c / total : 0;
        var marginals = new Histogram[3];
        var outside = new double[3];
        for (int k = 0; k < 3; k++)
        {
            int b = frame.MarginalBase(k);
            double w = frame.HalfWidths[k];
            marginals[k] = ReportParts.Density(counts.AsSpan(b + 1, n), total, -w, w, ess);
            outside[k] = Share(counts[b] + counts[b + n + 1]);
        }
        var radial = ReportParts.Density(counts.AsSpan(frame.RadialBase, n), total, 0, frame.RadialUpper, ess);
        int side = frame.Side;
        double w0 = frame.HalfWidths[0], w1 = frame.HalfWidths[1];
        var (density, error) = ReportParts.Densities(counts.AsSpan(frame.ProjectionBase, side * side), total, 2 * w0 / side * (2 * w1 / side), ess);
        return new SiteDistribution(frame.Centre, [.. frame.Axes], [.. marginals], [.. outside], radial, Share(counts[frame.RadialBase + n]),
            new ProjectedDensity(-w0, w0, -w1, w1, side, density, error, total), Share(counts[frame.ProjectionBase + side * side]));
    }

    private static ImmutableArray<Estimate> Estimates(double[] values, double[] errors) => [.. values.Select((v, i) => new Estimate(v, errors[i]))];
}
