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
/// A run's or sweep's numbers as tidy rows, one per temperature and quantity (component), for plotting against T:
/// <c>tidy-csv</c> (a header, then temperature, quantity, component, value, stdErr, unit) or <c>json-lines</c> (one JSON
/// object per row with the same keys). Values in the scenario's units; an error that cannot be estimated is empty or null.
/// </summary>
internal static class TidyWriter
{
    /// <summary>One row.</summary>
    internal readonly record struct Row(double Temperature, string Quantity, string Component, double Value, double? StandardError, string Unit);

    internal static IEnumerable<Row> Rows(ScenarioResults results)
    {
        var s = results.Scenario;
        double l = s.AngstromsPerLengthUnit, e = ScenarioUnits.Energy[s.EnergyUnit];
        string len = s.LengthUnit, en = s.EnergyUnit;
        foreach (var r in results.Pairs)
        {
            double t = r.Temperature.InKelvin;
            yield return new(t, "mean", "", r.Mean.Value / l, r.Mean.StandardError / l, len);
            if (r.MeanShift is { } shift)
            {
                yield return new(t, "meanShift", "", shift.Value / l, shift.StandardError / l, len);
            }
            yield return new(t, "variance", "", r.Variance.Value / (l * l), r.Variance.StandardError / (l * l), len + "^2");
            yield return new(t, "rms", "", r.Rms.Value / l, r.Rms.StandardError / l, len);
            yield return new(t, "thirdCumulant", "", r.ThirdCumulant.Value / (l * l * l), r.ThirdCumulant.StandardError / (l * l * l), len + "^3");
            yield return new(t, "fourthCumulant", "", r.FourthCumulant.Value / Math.Pow(l, 4), r.FourthCumulant.StandardError / Math.Pow(l, 4), len + "^4");
            yield return new(t, "potentialEnergy", "", r.PotentialEnergy.Value / e, r.PotentialEnergy.StandardError / e, en);
        }
        foreach (var r in results.Sites)
        {
            double t = r.Temperature.InKelvin;
            double msd = r.MeanSquareDisplacement.Value, msdSe = r.MeanSquareDisplacement.StandardError;
            yield return new(t, "uIso", "", msd / 3 / (l * l), msdSe / 3 / (l * l), len + "^2");
            yield return new(t, "meanSquareDisplacement", "", msd / (l * l), msdSe / (l * l), len + "^2");
            if (r.DebyeWallerB is { } b)
            {
                yield return new(t, "debyeWallerB", "", b.Value / (l * l), b.StandardError / (l * l), len + "^2");
            }
            var c = r.Covariance;
            double[] covariance = [c.XX, c.XY, c.XZ, c.YY, c.YZ, c.ZZ];
            for (int k = 0; k < 6; k++)
            {
                yield return new(t, "covariance", TensorComponents.Second[k], covariance[k] / (l * l), null, len + "^2");
            }
            for (int k = 0; k < r.ThirdCumulants.Length; k++)
            {
                yield return new(t, "thirdCumulant", TensorComponents.Third[k], r.ThirdCumulants[k].Value / (l * l * l),
                    r.ThirdCumulants[k].StandardError / (l * l * l), len + "^3");
            }
            for (int k = 0; k < r.FourthCumulants.Length; k++)
            {
                yield return new(t, "fourthCumulant", TensorComponents.Fourth[k], r.FourthCumulants[k].Value / Math.Pow(l, 4),
                    r.FourthCumulants[k].StandardError / Math.Pow(l, 4), len + "^4");
            }
            yield return new(t, "potentialEnergy", "", r.PotentialEnergy.Value / e, r.PotentialEnergy.StandardError / e, en);
        }
    }

    internal static void WriteCsv(ScenarioResults results, TextWriter w)
    {
        var c = CultureInfo.InvariantCulture;
        w.WriteLine("temperature,quantity,component,value,stdErr,unit");
        foreach (var row in Rows(results))
        {
            string se = row.StandardError is double x && double.IsFinite(x) ? x.ToString("R", c) : "";
            w.WriteLine(string.Join(",", row.Temperature.ToString("R", c), row.Quantity, row.Component, row.Value.ToString("R", c), se, row.Unit));
        }
    }

    internal static void WriteJsonLines(ScenarioResults results, Stream output)
    {
        foreach (var row in Rows(results))
        {
            using (var w = new Utf8JsonWriter(output))
            {
                w.WriteStartObject();
                w.WriteNumber("temperature", row.Temperature);
                w.WriteString("quantity", row.Quantity);
                w.WriteString("component", row.Component);
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
