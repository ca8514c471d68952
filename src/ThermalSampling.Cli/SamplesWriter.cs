using System.Globalization;
using System.IO;
using System.Text;

namespace ThermalSampling.Cli;

/// <summary>Writes the raw draws kept for <c>--samples</c> as CSV, in the scenario's length unit.</summary>
internal static class SamplesWriter
{
    internal const int DrawsPerChain = 1_000_000;

    internal static void Write(ScenarioResults results, string path)
    {
        double l = results.Scenario.AngstromsPerLengthUnit;
        string u = results.Scenario.LengthUnit;
        string temp = path + ".tmp";
        using (var w = new StreamWriter(temp, false, new UTF8Encoding(false)))
        {
            var c = CultureInfo.InvariantCulture;
            if (results.Pairs.Count > 0)
            {
                w.WriteLine($"temperature_K,chain,index,r_{u}");
                foreach (var r in results.Pairs)
                {
                    for (int chain = 0; chain < r.Draws.Chains.Length; chain++)
                    {
                        var draws = r.Draws.Chains[chain];
                        for (int i = 0; i < draws.Length; i++)
                        {
                            w.WriteLine(string.Create(c, $"{r.Temperature.InKelvin:R},{chain},{i},{draws[i] / l:R}"));
                        }
                    }
                }
            }
            else
            {
                w.WriteLine($"temperature_K,chain,index,x_{u},y_{u},z_{u}");
                foreach (var r in results.Sites)
                {
                    for (int chain = 0; chain < r.Draws.Chains.Length; chain++)
                    {
                        var draws = r.Draws.Chains[chain];
                        for (int i = 0; i < draws.Length; i++)
                        {
                            var p = draws[i];
                            w.WriteLine(string.Create(c, $"{r.Temperature.InKelvin:R},{chain},{i},{p.X / l:R},{p.Y / l:R},{p.Z / l:R}"));
                        }
                    }
                }
            }
        }
        File.Move(temp, path, overwrite: true);
    }
}
