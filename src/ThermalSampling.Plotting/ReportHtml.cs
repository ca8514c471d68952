using System;
using System.Collections.Generic;
using System.Globalization;
using System.Linq;
using System.Net;
using System.Text;
using ThermalSampling.Reports;

namespace ThermalSampling.Plotting;

/// <summary>
/// HTML views of reports and figures for notebooks: <c>display(HTML(report.ToHtml()))</c>. Plain strings, no notebook
/// dependency; values carry their standard errors and units, warnings follow the table.
/// </summary>
public static class ReportHtml
{
    /// <summary>A table of pair reports, one row per temperature, followed by their warnings.</summary>
    /// <param name="reports">The reports.</param>
    public static string ToHtml(this IEnumerable<PairVibrationReport> reports)
    {
        ArgumentNullException.ThrowIfNull(reports);
        var list = reports.ToList();
        var b = new StringBuilder();
        b.Append("<table><thead><tr>");
        foreach (string h in new[] { "T (K)", "mean (Å)", "shift (Å)", "shift, 1st order (Å)", "RMS (Å)", "RMS, harmonic (Å)", "RMS, quantum harm. (Å)", "z vs exact", "ESS", "R-hat" })
        {
            b.Append("<th>").Append(WebUtility.HtmlEncode(h)).Append("</th>");
        }
        b.Append("</tr></thead><tbody>");
        foreach (var r in list)
        {
            Row(b, Number(r.Temperature.InKelvin), WithError(r.Mean), r.MeanShift is null ? "–" : WithError(r.MeanShift), Number(r.FirstOrder?.MeanShiftInAngstroms),
                WithError(r.Rms), Number(r.Harmonic?.ClassicalRmsInAngstroms), Number(r.Harmonic?.QuantumRmsInAngstroms), Number(r.Exact.ZScoreMean),
                Number(r.Diagnostics.EffectiveSampleSize), Number(r.Diagnostics.RHat));
        }
        b.Append("</tbody></table>");
        Warnings(b, list.SelectMany(r => r.Warnings.Select(w => (r.Temperature.InKelvin, w.Code, w.Message))));
        return b.ToString();
    }

    /// <summary>A table of site reports, one row per temperature, followed by their warnings.</summary>
    /// <param name="reports">The reports.</param>
    public static string ToHtml(this IEnumerable<SiteVibrationReport> reports)
    {
        ArgumentNullException.ThrowIfNull(reports);
        var list = reports.ToList();
        var b = new StringBuilder();
        b.Append("<table><thead><tr>");
        foreach (string h in new[] { "T (K)", "MSD (Å²)", "MSD, harmonic (Å²)", "MSD, quantum harm. (Å²)", "B (Å²)", "U_xx (Å²)", "U_yy (Å²)", "U_zz (Å²)", "ESS", "R-hat" })
        {
            b.Append("<th>").Append(WebUtility.HtmlEncode(h)).Append("</th>");
        }
        b.Append("</tr></thead><tbody>");
        foreach (var r in list)
        {
            Row(b, Number(r.Temperature.InKelvin), WithError(r.MeanSquareDisplacement), Number(r.Harmonic.ClassicalMeanSquareDisplacement),
                Number(r.Harmonic.QuantumMeanSquareDisplacement), WithError(r.DebyeWallerB), Number(r.Covariance.XX), Number(r.Covariance.YY), Number(r.Covariance.ZZ),
                Number(r.Diagnostics.EffectiveSampleSize), Number(r.Diagnostics.RHat));
        }
        b.Append("</tbody></table>");
        Warnings(b, list.SelectMany(r => r.Warnings.Select(w => (r.Temperature.InKelvin, w.Code, w.Message))));
        return b.ToString();
    }

    /// <summary>One pair report as HTML.</summary>
    /// <param name="report">The report.</param>
    public static string ToHtml(this PairVibrationReport report) => new[] { report }.ToHtml();

    /// <summary>One site report as HTML.</summary>
    /// <param name="report">The report.</param>
    public static string ToHtml(this SiteVibrationReport report) => new[] { report }.ToHtml();

    /// <summary>
    /// One pair report as a notebook shows it: the table, its warnings and the sampled distribution with the harmonic
    /// Gaussian (the exact density needs the landscape: draw <see cref="VibrationFigures.PositionDistribution{TPotential}"/> for it).
    /// </summary>
    /// <param name="report">The report.</param>
    public static string ToHtmlWithFigure(this PairVibrationReport report)
        => report.ToHtml() + VibrationFigures.SampledDistribution(report).ToHtml(720, 440);

    /// <summary>One site report as a notebook shows it: the table, its warnings and, when draws were kept, the marginals and the projection.</summary>
    /// <param name="report">The report.</param>
    public static string ToHtmlWithFigure(this SiteVibrationReport report)
    {
        ArgumentNullException.ThrowIfNull(report);
        return report.Draws.Chains.All(c => c.IsEmpty)
            ? report.ToHtml() + "<p><i>No figure: keep draws with SamplingSettings.RetainedDrawsPerChain to see the marginals and the projection.</i></p>"
            : report.ToHtml() + VibrationFigures.SiteMarginals(report).ToHtml(720, 440) + VibrationFigures.SiteProjection(report).ToHtml(720, 440);
    }

    /// <summary>Pair reports of a sweep as a notebook shows them: the table, the warnings and, for two or more temperatures, the figure against temperature.</summary>
    /// <param name="reports">The reports.</param>
    public static string ToHtmlWithFigure(this IReadOnlyList<PairVibrationReport> reports)
        => reports.ToHtml() + (reports.Count >= 2 ? VibrationFigures.TemperatureSweep(reports).ToHtml(720, 440) : "");

    /// <summary>Site reports of a sweep as a notebook shows them: the table, the warnings and, for two or more temperatures, the figure against temperature.</summary>
    /// <param name="reports">The reports.</param>
    public static string ToHtmlWithFigure(this IReadOnlyList<SiteVibrationReport> reports)
        => reports.ToHtml() + (reports.Count >= 2 ? VibrationFigures.TemperatureSweep(reports).ToHtml(720, 440) : "");

    /// <summary>A figure as an inline PNG image tag.</summary>
    /// <param name="plot">The figure.</param>
    /// <param name="width">Width in pixels.</param>
    /// <param name="height">Height in pixels.</param>
    public static string ToHtml(this ScottPlot.Plot plot, int width = VibrationFigures.DefaultWidth, int height = VibrationFigures.DefaultHeight)
    {
        ArgumentNullException.ThrowIfNull(plot);
        return "<img src=\"data:image/png;base64," + Convert.ToBase64String(plot.GetImageBytes(width, height, ScottPlot.ImageFormat.Png)) + "\"/>";
    }

    private static void Row(StringBuilder b, params string[] cells)
    {
        b.Append("<tr>");
        foreach (string c in cells)
        {
            b.Append("<td style=\"text-align:right\">").Append(WebUtility.HtmlEncode(c)).Append("</td>");
        }
        b.Append("</tr>");
    }

    private static void Warnings(StringBuilder b, IEnumerable<(double Temperature, string Code, string Message)> warnings)
    {
        var list = warnings.ToList();
        if (list.Count == 0)
        {
            return;
        }
        b.Append("<ul>");
        foreach (var (t, code, message) in list)
        {
            b.Append("<li><b>").Append(Number(t)).Append(" K, ").Append(WebUtility.HtmlEncode(code)).Append("</b>: ").Append(WebUtility.HtmlEncode(message)).Append("</li>");
        }
        b.Append("</ul>");
    }

    private static string Number(double? value) => value is double v && double.IsFinite(v) ? v.ToString("G5", CultureInfo.InvariantCulture) : "–";

    private static string WithError(Estimate? e) => e?.ToRoundedString() ?? "— (left its site)";
}
