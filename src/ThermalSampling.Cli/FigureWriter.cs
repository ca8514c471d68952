using System.Collections.Generic;
using System.Globalization;
using System.IO;
using ThermalSampling.Landscapes;
using ThermalSampling.Plotting;
using ThermalSampling.Potentials;
using ThermalSampling.Reports;

namespace ThermalSampling.Cli;

/// <summary>
/// Writes the figures asked for with <c>--plot BASE.png|svg</c>: one position distribution per temperature
/// (BASE-T40K.png), the site marginals and projection per temperature, and a sweep figure (BASE-sweep.png) when there
/// are at least two temperatures.
/// </summary>
internal static class FigureWriter
{
    internal static List<string> WritePair<TPotential>(IReadOnlyList<PairVibrationReport> reports, PairLandscape<TPotential> landscape, string basePath)
        where TPotential : struct, IPairPotential
    {
        var written = new List<string>();
        foreach (var r in reports)
        {
            written.Add(Save(VibrationFigures.PositionDistribution(r, landscape), basePath, Suffix(r.Temperature.InKelvin)));
        }
        if (reports.Count >= 2)
        {
            written.Add(Save(VibrationFigures.TemperatureSweep(reports), basePath, "-sweep"));
        }
        return written;
    }

    internal static List<string> WriteSite(IReadOnlyList<SiteVibrationReport> reports, string basePath)
    {
        var written = new List<string>();
        foreach (var r in reports)
        {
            written.Add(Save(VibrationFigures.SiteMarginals(r), basePath, Suffix(r.Temperature.InKelvin) + "-marginals"));
            written.Add(Save(VibrationFigures.SiteProjection(r), basePath, Suffix(r.Temperature.InKelvin) + "-projection"));
        }
        if (reports.Count >= 2)
        {
            written.Add(Save(VibrationFigures.TemperatureSweep(reports), basePath, "-sweep"));
        }
        return written;
    }

    internal static bool HasFigureExtension(string path)
        => Path.GetExtension(path).ToLowerInvariant() is ".png" or ".svg";

    private static string Suffix(double kelvin) => "-T" + kelvin.ToString("G6", CultureInfo.InvariantCulture) + "K";

    private static string Save(ScottPlot.Plot plot, string basePath, string suffix)
    {
        string directory = Path.GetDirectoryName(Path.GetFullPath(basePath))!;
        Directory.CreateDirectory(directory);
        string path = Path.Combine(directory, Path.GetFileNameWithoutExtension(basePath) + suffix + Path.GetExtension(basePath));
        VibrationFigures.Save(plot, path);
        return path;
    }
}
