using System;
using System.Collections.Generic;
using System.Globalization;
using System.Linq;
using ThermalSampling.Analysis;

namespace ThermalSampling.Reports;

/// <summary>Verdicts that need a whole sweep rather than one temperature.</summary>
public static class SweepWarnings
{
    /// <summary>A basin's sampled share must move by more than this (absolute) across the sweep for the population-shift warning.</summary>
    public const double PopulationShiftToWarn = 0.1;

    /// <summary>
    /// The warning <see cref="WarningCodes.BasinPopulationShift"/> when the site's basin populations move across the
    /// temperatures of a sweep: a basin's sampled share changes by more than <see cref="PopulationShiftToWarn"/>, or the most
    /// populated basin changes; null otherwise (or with fewer than two reports).
    /// </summary>
    /// <param name="reports">The site reports of one landscape at several temperatures.</param>
    public static Warning? BasinPopulationShift(IReadOnlyList<SiteVibrationReport> reports)
    {
        Internal.Preconditions.CheckNotNull(reports, nameof(reports));
        if (reports.Count < 2)
        {
            return null;
        }
        var sorted = reports.OrderBy(r => r.Temperature.InKelvin).ToList();
        int basins = sorted.Max(r => r.BasinPopulations.Length);
        double Share(SiteVibrationReport r, int i) => r.BasinPopulations.FirstOrDefault(p => p.Index == i)?.SampledShare.Value ?? 0;
        int Dominant(SiteVibrationReport r) => r.BasinPopulations.MaxBy(p => p.SampledShare.Value)?.Index ?? 0;
        var c = CultureInfo.InvariantCulture;
        for (int i = 0; i < basins; i++)
        {
            var shares = sorted.Select(r => Share(r, i)).ToList();
            double low = shares.Min(), high = shares.Max();
            if (high - low > PopulationShiftToWarn)
            {
                var at = (sorted[shares.IndexOf(low)].Temperature.InKelvin, sorted[shares.IndexOf(high)].Temperature.InKelvin);
                return new Warning(WarningCodes.BasinPopulationShift, string.Format(c,
                    "The population moves between basins over the sweep: basin {0}{1} holds {2:P1} of the draws at {3:G4} K and {4:P1} at {5:G4} K. A single site's statistics describe a mixture whose proportions change with T; read the per-basin populations (basin.populations).",
                    i, i == 0 ? " (the site's)" : "", low, at.Item1, high, at.Item2));
            }
        }
        var dominant = sorted.Select(Dominant).Distinct().ToList();
        return dominant.Count > 1
            ? new Warning(WarningCodes.BasinPopulationShift, string.Format(c, "The most populated basin changes over the sweep (basins {0}); read the per-basin populations (basin.populations).", string.Join(", ", dominant)))
            : null;
    }
}
