using System;
using System.Collections.Generic;
using System.Globalization;
using System.Linq;
using ThermalSampling.Reports;

namespace ThermalSampling.Cli;

/// <summary>
/// One column of the human-readable report: a header with its unit and, optionally, a standard error. A value with an error
/// is rounded to what its error supports; a value without one is written with <paramref name="Format"/> (for example "F0" for
/// counts, "F2" for z-scores, "G4" for reference values), and a value that is 0 to within 1e-12 of the column's scale as 0.
/// </summary>
internal sealed record ReportColumn(string Name, string Unit, bool HasError, string Format = "G4");

/// <summary>One cell: a value with an optional standard error (NaN when absent), or a short text (a list of values).</summary>
internal readonly record struct ReportCell(double Value, double Error = double.NaN, string? Text = null);

/// <summary>The table/markdown/csv view of a run, built once and rendered by each format.</summary>
internal sealed record ReportTable(string Title, IReadOnlyList<ReportColumn> Columns, IReadOnlyList<ReportCell[]> Rows,
    IReadOnlyList<(double Temperature, string Code, string Message)> Warnings)
{
    /// <summary>The run's inputs in one line: mass, potential, landscape, sampling and seed (every document states them).</summary>
    internal string Inputs { get; init; } = "";

    internal static ReportTable From(ScenarioResults results)
    {
        var s = results.Scenario;
        double l = s.AngstromsPerLengthUnit;
        string u = s.LengthUnit == "angstrom" ? "Å" : s.LengthUnit, u2 = u + "²";
        var warnings = new List<(double, string, string)>();
        if (s.Landscape.Kind is "line" or "radial") // by the scenario, so a run cancelled before any result still has its own columns
        {
            var columns = new List<ReportColumn>
            {
                new("T", "K", false, "0.###"), new("mean", u, true), new("shift", u, true), new("shift 1st order", u, false),
                new("RMS about mean", u, true), new("RMS harmonic", u, false), new("RMS quantum harm.", u, false), new("RMS quantum exact", u, false),
                new("ħω", "meV", false, "G3"), new("skewness", "", false, "F2"),
                new("exact mean", u, false, "G6"), new("z(mean)", "", false, "F2"), new("P(near wall)", "", false, "G2"), new("ESS", "", false, "F0"), new("R-hat", "", false, "F3"),
            };
            var rows = results.Pairs.Select(r =>
            {
                warnings.AddRange(r.Warnings.Select(w => (r.Temperature.InKelvin, w.Code, UnitText.InUnits(w.Message, s.EnergyUnit, s.LengthUnit))));
                return new[]
                {
                    new ReportCell(r.Temperature.InKelvin),
                    new ReportCell(r.Mean.Value / l, r.Mean.StandardError / l),
                    r.MeanShift is { } ms ? new ReportCell(ms.Value / l, ms.StandardError / l) : new ReportCell(double.NaN),
                    new ReportCell((r.FirstOrder?.MeanShiftInAngstroms ?? double.NaN) / l),
                    new ReportCell(r.Rms.Value / l, r.Rms.StandardError / l),
                    new ReportCell((r.Harmonic?.ClassicalRmsInAngstroms ?? double.NaN) / l),
                    new ReportCell((r.Harmonic?.QuantumRmsInAngstroms ?? double.NaN) / l),
                    new ReportCell((r.QuantumExact?.RmsInAngstroms ?? double.NaN) / l), // only where classical statistics fail
                    new ReportCell(r.Harmonic?.Frequency.InMilliElectronVolts ?? double.NaN),
                    new ReportCell(r.Skewness),
                    new ReportCell(r.Exact.Mean / l),
                    new ReportCell(r.Exact.ZScoreMean),
                    new ReportCell(r.Exact.ProbabilityNearWalls),
                    new ReportCell(r.Diagnostics.EffectiveSampleSize),
                    new ReportCell(r.Diagnostics.RHat ?? double.NaN),
                };
            }).ToList();
            return new ReportTable(s.Title, columns, rows, warnings) { Inputs = InputsOf(results) };
        }
        var siteColumns = new List<ReportColumn>
        {
            new("T", "K", false, "0.###"), new("MSD", u2, true), new("MSD harmonic", u2, false), new("MSD quantum harm.", u2, false), new("B", u2, true),
            new("U_xx", u2, false), new("U_yy", u2, false), new("U_zz", u2, false), new("shift z", u, true), new("shift z 1st order", u, false),
            new("ħω modes", "meV", false), new("acceptance", "", false, "F2"), new("ESS", "", false, "F0"), new("R-hat", "", false, "F3"),
        };
        var siteRows = results.Sites.Select(r =>
        {
            warnings.AddRange(r.Warnings.Select(w => (r.Temperature.InKelvin, w.Code, UnitText.InUnits(w.Message, s.EnergyUnit, s.LengthUnit))));
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
                new ReportCell(double.NaN, Text: string.Join(", ", r.Harmonic.Modes.Select(m => m.Frequency.InMilliElectronVolts.ToString("G3", CultureInfo.InvariantCulture)))),
                new ReportCell(r.Diagnostics.AcceptanceRate ?? double.NaN),
                new ReportCell(r.Diagnostics.EffectiveSampleSize),
                new ReportCell(r.Diagnostics.RHat ?? double.NaN),
            };
        }).ToList();
        return new ReportTable(s.Title, siteColumns, siteRows, warnings) { Inputs = InputsOf(results) };
    }

    /// <summary>The inputs line: mass, the landscape's own description (potential parameters included), sampling and seed.</summary>
    private static string InputsOf(ScenarioResults results)
    {
        var s = results.Scenario;
        var o = s.Sampling;
        string landscape = results.Pairs.Count > 0 ? results.Pairs[0].Provenance.Landscape : results.Sites.Count > 0 ? results.Sites[0].Provenance.Landscape : s.Landscape.Kind;
        return string.Create(CultureInfo.InvariantCulture,
            $"mass {s.MassInAtomicMassUnits:G6} u; {landscape}; {(o.Method == Sampling.SamplingMethod.Metropolis ? "Metropolis" : "direct sampling")}, {o.Chains} chains × {o.SamplesPerChain} draws{(o.Method == Sampling.SamplingMethod.Metropolis ? $" after {o.BurnIn} burn-in steps" : "")}, seed {o.Seed}; library {Provenance.CurrentLibraryVersion}.{(results.Surface is { } sf ? $" Surface: {sf.Site}; {sf.Frame}." : "")} Lengths in Å in this line; RMS is the spread about the mean.");
    }

    internal static string Header(ReportColumn c) => c.Unit.Length > 0 ? $"{c.Name} ({c.Unit})" : c.Name;

    /// <summary>
    /// "value ± error" with the error to two significant digits and the value to the same decimal place; a value without an
    /// error in the column's format, with no exponent where a plain number of at most 12 characters fits; "–" when absent.
    /// </summary>
    internal static string Format(ReportCell cell, ReportColumn column)
    {
        if (cell.Text is not null)
        {
            return cell.Text;
        }
        if (double.IsFinite(cell.Error) && cell.Error > 0 || !double.IsFinite(cell.Value))
        {
            return new Estimate(cell.Value, double.IsFinite(cell.Error) ? cell.Error : 0).ToRoundedString();
        }
        double v = cell.Value;
        if (column.Format.StartsWith('G'))
        {
            int digits = int.Parse(column.Format.AsSpan(1), CultureInfo.InvariantCulture);
            if (Math.Abs(v) < 1e-12 * Math.Max(1, Math.Abs(v)) || Math.Abs(v) < 1e-15)
            {
                return "0";
            }
            // Significant digits without an exponent: as many decimals as the digits need, when that stays short.
            int decimals = Math.Max(0, digits - 1 - (int)Math.Floor(Math.Log10(Math.Abs(v))));
            string plain = v.ToString("F" + decimals.ToString(CultureInfo.InvariantCulture), CultureInfo.InvariantCulture);
            return plain.Length <= 12 ? plain : v.ToString(column.Format, CultureInfo.InvariantCulture);
        }
        return v.ToString(column.Format, CultureInfo.InvariantCulture);
    }
}
