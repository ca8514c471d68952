using System;
using System.Collections.Generic;
using System.Globalization;
using System.IO;
using System.Linq;
using ThermalSampling.Reports;

namespace ThermalSampling.Cli;

/// <summary>
/// <c>--format distribution-csv</c>: the sampled densities as one long table, a row per temperature, part and bin:
/// <c>temperature, part, lower, upper, secondLower, secondUpper, density, densityStdErr, exact, harmonic, unit</c>. A pair's
/// part is <c>separation</c> (with the exact and harmonic bin averages beside); a site's are <c>axis1</c>–<c>axis3</c>
/// (the marginals along the principal axes, coordinates from the distribution's centre), <c>radial</c> (the distance from
/// it) and <c>projection</c> (cells of the plane of axes 1 and 2: the second pair of edges is along axis 2). The same
/// numbers as the JSON document's <c>distribution</c>, in the scenario's length unit; empty cells where a column does not
/// apply.
/// </summary>
internal static class DistributionWriter
{
    internal const string Header = "temperature,part,lower,upper,secondLower,secondUpper,density,densityStdErr,exact,harmonic,unit";

    internal static void Write(ScenarioResults results, TextWriter w)
    {
        var s = results.Scenario;
        double l = s.AngstromsPerLengthUnit;
        string perLength = "1/" + s.LengthUnit, perArea = "1/" + s.LengthUnit + "^2";
        w.WriteLine(Header);
        foreach (var r in results.Pairs)
        {
            var h = r.Histogram;
            for (int i = 0; i < h.Density.Length; i++)
            {
                Line(w, r.Temperature.InKelvin, "separation", (h.Lower + i * h.BinWidth) / l, (h.Lower + (i + 1) * h.BinWidth) / l, null, null,
                    h.Density[i] * l, h.DensityStandardError[i] * l, r.ExactBinDensity[i] * l, r.HarmonicBinDensity.IsEmpty ? null : r.HarmonicBinDensity[i] * l, perLength);
            }
        }
        foreach (var r in results.Sites)
        {
            double t = r.Temperature.InKelvin;
            var d = r.Distribution;
            var parts = d.Marginals.Select((m, k) => ("axis" + (k + 1).ToString(CultureInfo.InvariantCulture), m)).Append(("radial", d.Radial));
            foreach (var (part, h) in parts)
            {
                for (int i = 0; i < h.Density.Length; i++)
                {
                    Line(w, t, part, (h.Lower + i * h.BinWidth) / l, (h.Lower + (i + 1) * h.BinWidth) / l, null, null, h.Density[i] * l, h.DensityStandardError[i] * l,
                        null, null, perLength);
                }
            }
            var p = d.Projection;
            double w1 = (p.FirstUpper - p.FirstLower) / p.Side, w2 = (p.SecondUpper - p.SecondLower) / p.Side;
            for (int i = 0; i < p.Side; i++)
            {
                for (int j = 0; j < p.Side; j++)
                {
                    Line(w, t, "projection", (p.FirstLower + i * w1) / l, (p.FirstLower + (i + 1) * w1) / l, (p.SecondLower + j * w2) / l,
                        (p.SecondLower + (j + 1) * w2) / l, p.At(i, j) * l * l, p.DensityStandardError[i * p.Side + j] * l * l, null, null, perArea);
                }
            }
        }
    }

    private static void Line(TextWriter w, double t, string part, double lower, double upper, double? secondLower, double? secondUpper, double density,
        double error, double? exact, double? harmonic, string unit)
        => w.WriteLine(string.Join(",", Number(t), part, Number(lower), Number(upper), Number(secondLower), Number(secondUpper), Number(density), Number(error),
            Number(exact), Number(harmonic), unit));

    private static string Number(double? v) => v is double x && double.IsFinite(x) ? x.ToString("R", CultureInfo.InvariantCulture) : "";
}
