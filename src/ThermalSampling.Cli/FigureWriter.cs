using System.Collections.Generic;
using System.Globalization;
using System.IO;
using System.Linq;
using ScottPlot;
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
        string? title = null, FigureUnits? units = null, IReadOnlyList<ReweightedPairEstimate>? reweighted = null)
        where TPotential : struct, IPairPotential
    {
        var written = new List<string>();
        var names = TemperatureNames(reports.Select(r => r.Temperature.InKelvin).ToList());
        if (reports.Count >= 2)
        {
            written.Add(Save(VibrationFigures.TemperatureSweep(reports, title, units), basePath, ""));
        }
        if (reweighted is { Count: >= 2 })
        {
            written.Add(Save(VibrationFigures.ReweightedSweep(reports, reweighted, title, units), basePath, "-reweighted"));
        }
        written.AddRange(SaveDistributions([.. reports.Select(r => VibrationFigures.PositionDistribution(r, landscape, title, units))], names, basePath));
        return written;
    }

    /// <summary>One distribution figure per temperature (named by it; the base name alone for one), or their panels when there are many.</summary>
    private static IEnumerable<string> SaveDistributions(IReadOnlyList<ScottPlot.Plot> plots, IReadOnlyList<string> names, string basePath)
    {
        if (Panelled(basePath, plots.Count))
        {
            return [SavePanels(plots, basePath, "-distributions")];
        }
        return [.. plots.Select((plot, i) => Save(plot, basePath, plots.Count == 1 ? "" : names[i]))];
    }

    internal static List<string> WriteSite(IReadOnlyList<SiteVibrationReport> reports, string basePath, string? title = null, FigureUnits? units = null,
        IReadOnlyList<ReweightedSiteEstimate>? reweighted = null)
    {
        var written = new List<string>();
        var names = TemperatureNames(reports.Select(r => r.Temperature.InKelvin).ToList());
        if (reports.Count >= 2)
        {
            written.Add(Save(VibrationFigures.TemperatureSweep(reports, title, units), basePath, ""));
        }
        if (reweighted is { Count: >= 2 })
        {
            written.Add(Save(VibrationFigures.ReweightedSweep(reports, reweighted, title, units), basePath, "-reweighted"));
        }
        if (reports.Count >= 2 && reports.Any(r => r.BasinPopulations.Length > 1))
        {
            written.Add(Save(VibrationFigures.BasinPopulations(reports, title), basePath, "-basins"));
        }
        if (Panelled(basePath, reports.Count))
        {
            written.Add(SavePanels(reports.Select(r => VibrationFigures.SiteMarginals(r, title, units)).ToList(), basePath, "-marginals"));
            written.Add(SavePanels(reports.Select(r => VibrationFigures.SiteProjection(r, title, units)).ToList(), basePath, "-projections"));
            return written;
        }
        for (int i = 0; i < reports.Count; i++)
        {
            written.Add(Save(VibrationFigures.SiteMarginals(reports[i], title, units), basePath, reports.Count == 1 ? "" : names[i] + "-marginals"));
            written.Add(Save(VibrationFigures.SiteProjection(reports[i], title, units), basePath, (reports.Count == 1 ? "" : names[i]) + "-projection"));
        }
        return written;
    }

    /// <summary>The figures of a quantum pair scenario: the sweep with path-integral points, and each temperature's classical and quantum distributions together.</summary>
    internal static List<string> WritePairQuantum<TPotential>(IReadOnlyList<PairPathIntegralReport> reports, PairLandscape<TPotential> landscape, string basePath,
        string? title = null, FigureUnits? units = null)
        where TPotential : struct, IPairPotential
    {
        var written = new List<string>();
        var names = TemperatureNames(reports.Select(r => r.Temperature.InKelvin).ToList());
        if (reports.Count >= 2)
        {
            written.Add(Save(VibrationFigures.PathIntegralSweep(reports, title, units), basePath, ""));
        }
        written.AddRange(SaveDistributions([.. reports.Select(r => VibrationFigures.PathIntegralDistribution(r, landscape, title, units))], names, basePath));
        return written;
    }

    /// <summary>The figures of a quantum site scenario: the MSD sweep with path-integral points, and each temperature's quantum and classical marginals and its projection.</summary>
    internal static List<string> WriteSiteQuantum(IReadOnlyList<SitePathIntegralReport> reports, string basePath, string? title = null, FigureUnits? units = null)
    {
        var written = new List<string>();
        var names = TemperatureNames(reports.Select(r => r.Temperature.InKelvin).ToList());
        if (reports.Count >= 2)
        {
            written.Add(Save(VibrationFigures.PathIntegralSweep(reports, title, units), basePath, ""));
        }
        if (Panelled(basePath, reports.Count))
        {
            written.Add(SavePanels(reports.Select(r => VibrationFigures.PathIntegralSiteMarginals(r, title, units)).ToList(), basePath, "-marginals"));
            written.Add(SavePanels(reports.Select(r => VibrationFigures.SiteProjection(r.ToVibrationReport(), title, units)).ToList(), basePath, "-projections"));
            return written;
        }
        for (int i = 0; i < reports.Count; i++)
        {
            written.Add(Save(VibrationFigures.PathIntegralSiteMarginals(reports[i], title, units), basePath, reports.Count == 1 ? "" : names[i] + "-marginals"));
            written.Add(Save(VibrationFigures.SiteProjection(reports[i].ToVibrationReport(), title, units), basePath, (reports.Count == 1 ? "" : names[i]) + "-projection"));
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

    /// <summary>Four or more temperatures drawn as PNG go into one figure of panels (a reader compares them side by side) rather than a file each.</summary>
    private static bool Panelled(string basePath, int temperatures)
        => temperatures >= PanelThreshold && Path.GetExtension(basePath).Equals(".png", System.StringComparison.OrdinalIgnoreCase);

    /// <summary>The smallest number of temperatures drawn as panels of one figure.</summary>
    internal const int PanelThreshold = 4;

    /// <summary>The plots as panels of one PNG, three to a row, each at the usual size.</summary>
    private static string SavePanels(IReadOnlyList<ScottPlot.Plot> plots, string basePath, string suffix)
    {
        const int columns = 3;
        int rows = (plots.Count + columns - 1) / columns;
        int w = VibrationFigures.DefaultWidth, h = VibrationFigures.DefaultHeight;
        string directory = Path.GetDirectoryName(Path.GetFullPath(basePath))!;
        Directory.CreateDirectory(directory);
        string path = Path.Combine(directory, Path.GetFileNameWithoutExtension(basePath) + suffix + ".png");
        // Each panel rendered at the usual size and placed on one canvas (SkiaSharp, which ScottPlot draws with).
        using (var surface = SkiaSharp.SKSurface.Create(new SkiaSharp.SKImageInfo(columns * w, rows * h)))
        {
            surface.Canvas.Clear(SkiaSharp.SKColors.White);
            for (int i = 0; i < plots.Count; i++)
            {
                using var panel = SkiaSharp.SKBitmap.Decode(plots[i].GetImageBytes(w, h, ImageFormat.Png));
                surface.Canvas.DrawBitmap(panel, i % columns * w, i / columns * h);
            }
            using var image = surface.Snapshot();
            using var data = image.Encode(SkiaSharp.SKEncodedImageFormat.Png, 100);
            using var file = File.Create(path);
            data.SaveTo(file);
        }
        return path;
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
