using System;
using System.Collections.Generic;
using System.Globalization;
using System.IO;
using System.Linq;
using System.Text;
using System.Text.Json;
using ThermalSampling.Analysis;
using ThermalSampling.Reports;

namespace ThermalSampling.Cli;

/// <summary>
/// A run's or sweep's numbers as tidy rows, one per temperature, quantity (component) and method, for plotting against T
/// and for data tools: <c>tidy-csv</c> (a header, then scenario, temperature, quantity, component, method, value, stdErr,
/// unit) or <c>json-lines</c> (one JSON object per row with the same keys). The method says where a value comes from:
/// <c>metropolis</c>, <c>direct</c>, <c>replica-exchange</c> or <c>path-integral</c> (sampled), <c>reweighted</c> (from the
/// sampled temperatures), <c>exact</c> (quadrature of a line or radial pair) or <c>harmonic</c>. Values in the scenario's
/// units; an error that cannot be estimated (or that an estimate does not have) is empty or null.
/// </summary>
internal static class TidyWriter
{
    /// <summary>One row.</summary>
    internal readonly record struct Row(double Temperature, string Quantity, string Component, string Method, double Value, double? StandardError, string Unit);

    /// <summary>How the scenario's sampled values were drawn.</summary>
    private static string SampledMethod(Scenario s) => s.Quantum ? "path-integral"
        : s.Sampling.SwapInterval is not null ? "replica-exchange"
        : s.Sampling.Method == Sampling.SamplingMethod.Direct ? "direct" : "metropolis";

    internal static IEnumerable<Row> Rows(ScenarioResults results)
    {
        var s = results.Scenario;
        double l = s.AngstromsPerLengthUnit, e = ScenarioUnits.Energy[s.EnergyUnit];
        string len = s.LengthUnit, en = s.EnergyUnit, sampled = SampledMethod(s);
        foreach (var r in results.Pairs)
        {
            double t = r.Temperature.InKelvin;
            yield return new(t, "mean", "", sampled, r.Mean.Value / l, r.Mean.StandardError / l, len);
            if (r.MeanShift is { } shift)
            {
                yield return new(t, "meanShift", "", sampled, shift.Value / l, shift.StandardError / l, len);
            }
            yield return new(t, "variance", "", sampled, r.Variance.Value / (l * l), r.Variance.StandardError / (l * l), len + "^2");
            yield return new(t, "rms", "", sampled, r.Rms.Value / l, r.Rms.StandardError / l, len);
            yield return new(t, "thirdCumulant", "", sampled, r.ThirdCumulant.Value / (l * l * l), r.ThirdCumulant.StandardError / (l * l * l), len + "^3");
            yield return new(t, "fourthCumulant", "", sampled, r.FourthCumulant.Value / Math.Pow(l, 4), r.FourthCumulant.StandardError / Math.Pow(l, 4), len + "^4");
            yield return new(t, "potentialEnergy", "", sampled, r.PotentialEnergy.Value / e, r.PotentialEnergy.StandardError / e, en);
            yield return new(t, "mean", "", "exact", r.Exact.Mean / l, null, len);
            yield return new(t, "variance", "", "exact", r.Exact.Variance / (l * l), null, len + "^2");
            if (r.Harmonic is { } h)
            {
                yield return new(t, "variance", "", "harmonic", h.ClassicalVarianceInAngstromsSquared / (l * l), null, len + "^2");
            }
            foreach (var row in Ladder(t, r.Diagnostics))
            {
                yield return row;
            }
        }
        foreach (var r in results.Sites)
        {
            double t = r.Temperature.InKelvin;
            double msd = r.MeanSquareDisplacement.Value, msdSe = r.MeanSquareDisplacement.StandardError;
            yield return new(t, "uIso", "", sampled, msd / 3 / (l * l), msdSe / 3 / (l * l), len + "^2");
            yield return new(t, "meanSquareDisplacement", "", sampled, msd / (l * l), msdSe / (l * l), len + "^2");
            if (r.DebyeWallerB is { } b)
            {
                yield return new(t, "debyeWallerB", "", sampled, b.Value / (l * l), b.StandardError / (l * l), len + "^2");
            }
            var c = r.Covariance;
            double[] covariance = [c.XX, c.XY, c.XZ, c.YY, c.YZ, c.ZZ];
            for (int k = 0; k < 6; k++)
            {
                yield return new(t, "covariance", TensorComponents.Second[k], sampled, covariance[k] / (l * l), null, len + "^2");
            }
            for (int k = 0; k < r.ThirdCumulants.Length; k++)
            {
                yield return new(t, "thirdCumulant", TensorComponents.Third[k], sampled, r.ThirdCumulants[k].Value / (l * l * l),
                    r.ThirdCumulants[k].StandardError / (l * l * l), len + "^3");
            }
            for (int k = 0; k < r.FourthCumulants.Length; k++)
            {
                yield return new(t, "fourthCumulant", TensorComponents.Fourth[k], sampled, r.FourthCumulants[k].Value / Math.Pow(l, 4),
                    r.FourthCumulants[k].StandardError / Math.Pow(l, 4), len + "^4");
            }
            yield return new(t, "potentialEnergy", "", sampled, r.PotentialEnergy.Value / e, r.PotentialEnergy.StandardError / e, en);
            yield return new(t, "meanSquareDisplacement", "", "harmonic", r.Harmonic.ClassicalMeanSquareDisplacement / (l * l), null, len + "^2");
            foreach (var row in Ladder(t, r.Diagnostics))
            {
                yield return row;
            }
        }
        foreach (var r in results.PairReweighted ?? [])
        {
            double t = r.Temperature.InKelvin;
            yield return new(t, "mean", "", "reweighted", r.Mean.Value / l, r.Mean.StandardError / l, len);
            yield return new(t, "variance", "", "reweighted", r.Variance.Value / (l * l), r.Variance.StandardError / (l * l), len + "^2");
            yield return new(t, "rms", "", "reweighted", r.Rms.Value / l, r.Rms.StandardError / l, len);
            yield return new(t, "potentialEnergy", "", "reweighted", r.PotentialEnergy.Value / e, r.PotentialEnergy.StandardError / e, en);
        }
        foreach (var r in results.SiteReweighted ?? [])
        {
            double t = r.Temperature.InKelvin;
            double msd = r.MeanSquareDisplacement.Value, msdSe = r.MeanSquareDisplacement.StandardError;
            yield return new(t, "uIso", "", "reweighted", msd / 3 / (l * l), msdSe / 3 / (l * l), len + "^2");
            yield return new(t, "meanSquareDisplacement", "", "reweighted", msd / (l * l), msdSe / (l * l), len + "^2");
            yield return new(t, "debyeWallerB", "", "reweighted", r.DebyeWallerB.Value / (l * l), r.DebyeWallerB.StandardError / (l * l), len + "^2");
            yield return new(t, "potentialEnergy", "", "reweighted", r.PotentialEnergy.Value / e, r.PotentialEnergy.StandardError / e, en);
        }
    }

    /// <summary>A ladder rung's swap acceptance with the next-higher rung (none for the top one).</summary>
    private static IEnumerable<Row> Ladder(double t, SamplingDiagnostics d)
    {
        if (d.ReplicaExchange?.SwapAcceptance is double a)
        {
            yield return new(t, "swapAcceptance", "", "replica-exchange", a, null, "1");
        }
    }

    internal static void WriteCsv(ScenarioResults results, TextWriter w)
    {
        var c = CultureInfo.InvariantCulture;
        w.WriteLine("scenario,temperature,quantity,component,method,value,stdErr,unit");
        string scenario = Csv(results.Scenario.Title);
        foreach (var row in Rows(results))
        {
            string se = row.StandardError is double x && double.IsFinite(x) ? x.ToString("R", c) : "";
            w.WriteLine(string.Join(",", scenario, row.Temperature.ToString("R", c), row.Quantity, row.Component, row.Method, row.Value.ToString("R", c), se, row.Unit));
        }
    }

    /// <summary>One tidy row as Parquet stores it (the columns of <c>tidy-csv</c>, with their types).</summary>
    internal sealed class ParquetRow
    {
        /// <summary>The scenario's title.</summary>
        public string Scenario { get; set; } = "";

        /// <summary>K.</summary>
        public double Temperature { get; set; }

        /// <summary>The quantity.</summary>
        public string Quantity { get; set; } = "";

        /// <summary>The tensor component, empty for a scalar.</summary>
        public string Component { get; set; } = "";

        /// <summary>Where the value comes from.</summary>
        public string Method { get; set; } = "";

        /// <summary>The value, in the scenario's units.</summary>
        public double Value { get; set; }

        /// <summary>Its standard error, or null where none is estimated.</summary>
        public double? StdErr { get; set; }

        /// <summary>The unit.</summary>
        public string Unit { get; set; } = "";
    }

    /// <summary>
    /// The tidy rows as one Apache Parquet file (Parquet.Net's class serialiser): the columns of <c>tidy-csv</c>, typed
    /// (strings, doubles, and a nullable double for the standard error). Built in memory, so it can go to a stream that
    /// cannot seek, such as standard output.
    /// </summary>
    internal static void WriteParquet(ScenarioResults results, Stream output)
    {
        string scenario = results.Scenario.Title;
        var rows = Rows(results).Select(r => new ParquetRow
        {
            Scenario = scenario, Temperature = r.Temperature, Quantity = r.Quantity, Component = r.Component, Method = r.Method, Value = r.Value,
            StdErr = r.StandardError is double x && double.IsFinite(x) ? x : null, Unit = r.Unit,
        }).ToList();
        using var buffer = new MemoryStream();
        Parquet.Serialization.ParquetSerializer.SerializeAsync(rows, buffer).GetAwaiter().GetResult();
        buffer.Position = 0;
        buffer.CopyTo(output);
    }

    /// <summary>A CSV field: quoted (inner quotes doubled) when it holds a comma, a quote or a line break.</summary>
    private static string Csv(string text)
        => text.AsSpan().IndexOfAny(",\"\r\n") < 0 ? text : "\"" + text.Replace("\"", "\"\"", StringComparison.Ordinal) + "\"";

    internal static void WriteJsonLines(ScenarioResults results, Stream output)
    {
        foreach (var row in Rows(results))
        {
            using (var w = new Utf8JsonWriter(output))
            {
                w.WriteStartObject();
                w.WriteString("scenario", results.Scenario.Title);
                w.WriteNumber("temperature", row.Temperature);
                w.WriteString("quantity", row.Quantity);
                w.WriteString("component", row.Component);
                w.WriteString("method", row.Method);
                w.WriteNumber("value", row.Value);
                if (row.StandardError is double x && double.IsFinite(x))
                {
                    w.WriteNumber("stdErr", x);
                }
                else
                {
                    w.WriteNull("stdErr");
                }
                w.WriteString("unit", row.Unit);
                w.WriteEndObject();
            }
            output.WriteByte((byte)'\n');
        }
    }
}
