using System;
using System.Collections.Generic;
using System.Globalization;
using System.Linq;
using ThermalSampling.Reports;

namespace ThermalSampling.Cli;

/// <summary>One column of the human-readable report: a header with its unit and, optionally, a standard error.</summary>
internal sealed record ReportColumn(string Name, string Unit, bool HasError);

/// <summary>One cell: a value with an optional standard error (NaN when absent).</summary>
internal readonly record struct ReportCell(double Value, double Error = double.NaN);

/// <summary>The table/markdown/csv view of a run, built once and rendered by each format.</summary>
internal sealed record ReportTable(string Title, IReadOnlyList<ReportColumn> Columns, IReadOnlyList<ReportCell[]> Rows,
    IReadOnlyList<(double Temperature, string Code, string Message)> Warnings)
{
    internal static ReportTable From(ScenarioResults results)
    {
        var s = results.Scenario;
        double l = s.AngstromsPerLengthUnit;
        string u = s.LengthUnit == "angstrom" ? "Å" : s.LengthUnit, u2 = u + "²";
        var warnings = new List<(double, string, string)>();
        if (results.Pairs.Count > 0)
        {
            var columns = new List<ReportColumn>
            {
                new("T", "K", false), new("mean", u, true), new("shift", u, true), new("shift 1st order", u, false),
                new("RMS", u, true), new("RMS harmonic", u, false), new("RMS quantum", u, false), new("skewness", "", false),
                new("exact mean", u, false), new("z(mean)", "", false), new("P(≤1 RMS of a wall)", "", false), new("ESS", "", false), new("R-hat", "", false),
            };
            var rows = results.Pairs.Select(r =>
            {
                warnings.AddRange(r.Warnings.Select(w => (r.Temperature.InKelvin, w.Code, w.Message)));
                return new[]
                {
                    new ReportCell(r.Temperature.InKelvin),
                    new ReportCell(r.Mean.Value / l, r.Mean.StandardError / l),
                    r.MeanShift is { } ms ? new ReportCell(ms.Value / l, ms.StandardError / l) : new ReportCell(double.NaN),
                    new ReportCell((r.FirstOrder?.MeanShiftInAngstroms ?? double.NaN) / l),
                    new ReportCell(r.Rms.Value / l, r.Rms.StandardError / l),
                    new ReportCell((r.Harmonic?.ClassicalRmsInAngstroms ?? double.NaN) / l),
                    new ReportCell((r.Harmonic?.QuantumRmsInAngstroms ?? double.NaN) / l),
                    new ReportCell(r.Skewness),
                    new ReportCell(r.Exact.Mean / l),
                    new ReportCell(r.Exact.ZScoreMean),
                    new ReportCell(r.Exact.ProbabilityNearWalls),
                    new ReportCell(r.Diagnostics.EffectiveSampleSize),
                    new ReportCell(r.Diagnostics.RHat ?? double.NaN),
                };
            }).ToList();
            return new ReportTable(s.Title, columns, rows, warnings);
        }
        var siteColumns = new List<ReportColumn>
        {
            new("T", "K", false), new("MSD", u2, true), new("MSD harmonic", u2, false), new("MSD quantum harm.", u2, false), new("B", u2, true),
            new("U_xx", u2, false), new("U_yy", u2, false), new("U_zz", u2, false), new("shift z", u, true), new("shift z 1st order", u, false),
            new("acceptance", "", false), new("ESS", "", false), new("R-hat", "", false),
        };
        var siteRows = results.Sites.Select(r =>
        {
            warnings.AddRange(r.Warnings.Select(w => (r.Temperature.InKelvin, w.Code, w.Message)));
            return new[]
            {
                new ReportCell(r.Temperature.InKelvin),
                new ReportCell(r.MeanSquareDisplacement.Value / (l * l), r.MeanSquareDisplacement.StandardError / (l * l)),
                new ReportCell(r.StaysAtSite ? r.Harmonic.ClassicalMeanSquareDisplacement / (l * l) : double.NaN),
                new ReportCell(r.StaysAtSite ? r.Harmonic.QuantumMeanSquareDisplacement / (l * l) : double.NaN),
                r.DebyeWallerB is { } b ? new ReportCell(b.Value / (l * l), b.StandardError / (l * l)) : new ReportCell(double.NaN),
                new ReportCell(r.Covariance.XX / (l * l)), new ReportCell(r.Covariance.YY / (l * l)), new ReportCell(r.Covariance.ZZ / (l * l)),
                new ReportCell(r.MeanShift.Z / l, r.MeanStandardError.Z / l),
                new ReportCell(r.StaysAtSite ? r.Harmonic.FirstOrderMeanShift.Z / l : double.NaN),
                new ReportCell(r.Diagnostics.AcceptanceRate ?? double.NaN),
                new ReportCell(r.Diagnostics.EffectiveSampleSize),
                new ReportCell(r.Diagnostics.RHat ?? double.NaN),
            };
        }).ToList();
        return new ReportTable(s.Title, siteColumns, siteRows, warnings);
    }

    internal static string Header(ReportColumn c) => c.Unit.Length > 0 ? $"{c.Name} ({c.Unit})" : c.Name;

    /// <summary>"value ± error" with the error to two significant digits and the value to the same decimal place.</summary>
    internal static string Format(ReportCell cell)
    {
        return new Estimate(cell.Value, double.IsFinite(cell.Error) ? cell.Error : 0).ToRoundedString();
    }
}
