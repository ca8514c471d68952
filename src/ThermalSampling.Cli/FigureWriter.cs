using System.Collections.Generic;
using System.Globalization;
using System.IO;
using System.Linq;
using ThermalSampling.Landscapes;
using ThermalSampling.Plotting;
using ThermalSampling.Potentials;
using ThermalSampling.Reports;

namespace ThermalSampling.Cli;

/// <summary>
/// Writes the figures asked for with <c>--plot FILE.png|svg</c>. FILE itself is always written: the figure against
/// temperature when there are several temperatures, else the position distribution (pairs) or the marginals (sites).
/// The figures of each temperature go beside it, named by the temperature rounded to what tells them apart
/// (FILE-T40K.png, FILE-T37.8K-projection.png). Every figure carries the scenario's title and its cautions.
/// </summary>
internal static class FigureWriter
{
    internal static List<string> WritePair<TPotential>(IReadOnlyList<PairVibrationReport> reports, PairLandscape<TPotential> landscape, string basePath,
        string? title = null, FigureUnits? units = null)
        where TPotential : struct, IPairPotential
    {
        var written = new List<string>();
        var names = TemperatureNames(reports.Select(r => r.Temperature.InKelvin).ToList());
        if (reports.Count >= 2)
        {
            written.Add(Save(VibrationFigures.TemperatureSweep(reports, title, units), basePath, ""));
        }
        for (int i = 0; i < reports.Count; i++)
        {
            written.Add(Save(VibrationFigures.PositionDistribution(reports[i], landscape, title, units), basePath, reports.Count == 1 ? "" : names[i]));
        }
        return written;
    }

    internal static List<string> WriteSite(IReadOnlyList<SiteVibrationReport> reports, string basePath, string? title = null, FigureUnits? units = null)
    {
        var written = new List<string>();
        var names = TemperatureNames(reports.Select(r => r.Temperature.InKelvin).ToList());
        if (reports.Count >= 2)
        {
            written.Add(Save(VibrationFigures.TemperatureSweep(reports, title, units), basePath, ""));
        }
        for (int i = 0; i < reports.Count; i++)
        {
            written.Add(Save(VibrationFigures.SiteMarginals(reports[i], title, units), basePath, reports.Count == 1 ? "" : names[i] + "-marginals"));
            written.Add(Save(VibrationFigures.SiteProjection(reports[i], title, units), basePath, (reports.Count == 1 ? "" : names[i]) + "-projection"));
        }
        return written;
    }

    /// <summary>The scenario's own units for its figures (an energy given as E/kB in K is drawn in meV).</summary>
    internal static FigureUnits UnitsOf(Scenario scenario)
    {
        string length = scenario.LengthUnit == "angstrom" ? "Å" : scenario.LengthUnit;
        return scenario.EnergyUnit == "K"
            ? new FigureUnits(length, ScenarioUnits.Length[scenario.LengthUnit], "meV", 1e-3)
            : new FigureUnits(length, ScenarioUnits.Length[scenario.LengthUnit], scenario.EnergyUnit, ScenarioUnits.Energy[scenario.EnergyUnit]);
    }

    internal static bool HasFigureExtension(string path)
        => Path.GetExtension(path).ToLowerInvariant() is ".png" or ".svg";

    /// <summary>"-T40K", "-T37.8K": each temperature with the fewest significant digits (2 to 6) that keep all the names distinct.</summary>
    internal static List<string> TemperatureNames(IReadOnlyList<double> kelvins)
    {
        for (int digits = 2; digits <= 6; digits++)
        {
            var names = kelvins.Select(k => "-T" + Round(k, digits).ToString("G6", CultureInfo.InvariantCulture) + "K").ToList();
            if (names.Distinct().Count() == names.Count || digits == 6)
            {
                return names;
            }
        }
        return [];
    }

    private static double Round(double value, int significant)
    {
        if (value == 0)
        {
            return 0;
        }
        int decimals = significant - 1 - (int)System.Math.Floor(System.Math.Log10(System.Math.Abs(value)));
        return decimals >= 0 ? System.Math.Round(value, System.Math.Min(decimals, 15)) : System.Math.Round(value / System.Math.Pow(10, -decimals)) * System.Math.Pow(10, -decimals);
    }

    private static string Save(ScottPlot.Plot plot, string basePath, string suffix)
    {
        string directory = Path.GetDirectoryName(Path.GetFullPath(basePath))!;
        Directory.CreateDirectory(directory);
        string path = Path.Combine(directory, Path.GetFileNameWithoutExtension(basePath) + suffix + Path.GetExtension(basePath));
        VibrationFigures.Save(plot, path);
        return path;
    }
}
