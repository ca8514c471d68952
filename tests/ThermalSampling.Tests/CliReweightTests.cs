using System;
using System.IO;
using System.Linq;
using System.Text;
using System.Text.Json;
using ThermalSampling.Cli;
using Xunit;
using static ThermalSampling.Tests.CliHarness;

namespace ThermalSampling.Tests;

/// <summary>The scenario contract of reweighting across temperatures: sampling.reweightTo and sweep --reweight-to.</summary>
public class CliReweightTests
{
    /// <summary>An invented Lennard-Jones pair (15 meV at 3.5 Å) of 50 u on [3.0, 5.0] Å at 10, 20 and 40 K.</summary>
    private const string Scenario = """
        {
          "title": "invented reweighted pair",
          "mass": 50,
          "potential": { "form": "lennard-jones", "wellDepth": 0.015, "equilibriumDistance": 3.5 },
          "landscape": { "kind": "line", "window": [3.0, 5.0] },
          "temperatures": [10, 20, 40],
          "sampling": { "chains": 4, "samplesPerChain": 20000, "burnIn": 2000, "seed": 3, "reweightTo": { "from": 12, "to": 36, "count": 5 } }
        }
        """;

    /// <summary>
    /// Sampled results say "source": "sampled"; one result per target follows with "source": "reweighted", the usual keys
    /// with standard errors, exact quadrature and where it came from; the sharded sweep merges to the same document.
    /// </summary>
    [Fact]
    public void Reweighted_results_carry_the_contract_keys_and_merge_like_the_rest()
    {
        string file = WriteScenario(Scenario);
        var parts = Enumerable.Range(1, 2).Select(i => Path.Combine(Path.GetTempPath(), $"ts-part-{Guid.NewGuid():N}-{i}.json")).ToArray();
        try
        {
            var (code, stdout, stderr) = RunArgs("run", file, "--format", "json", "--quiet");
            Assert.True(code == 0, stderr);
            var results = JsonDocument.Parse(stdout).RootElement.GetProperty("results").EnumerateArray().ToList();
            Assert.Equal(8, results.Count);
            Assert.All(results.Take(3), r => Assert.Equal("sampled", r.GetProperty("source").GetString()));
            var reweighted = results.Skip(3).ToList();
            Assert.Equal([12.0, 18, 24, 30, 36], reweighted.Select(r => r.GetProperty("temperature").GetDouble()));
            foreach (var r in reweighted)
            {
                Assert.Equal("reweighted", r.GetProperty("source").GetString());
                foreach (var key in new[] { "mean", "meanStdErr", "meanShift", "meanShiftStdErr", "variance", "varianceStdErr", "rms", "rmsStdErr", "exact", "reweighting" })
                {
                    Assert.True(r.TryGetProperty(key, out _), $"missing {key}");
                }
                Assert.True(Math.Abs(r.GetProperty("exact").GetProperty("zScoreVariance").GetDouble()) < 4);
            }
            var (sweepCode, sweep, _) = RunArgs("sweep", file, "--format", "json", "--quiet");
            Assert.Equal(0, sweepCode);
            for (int i = 0; i < 2; i++)
            {
                Assert.Equal(0, RunArgs("sweep", file, "--shard", $"{i + 1}/2", "--output", parts[i], "--quiet").Code);
            }
            var (mergeCode, merged, mergeErr) = RunArgs("merge", parts[0], parts[1]);
            Assert.True(mergeCode == 0, mergeErr);
            Assert.Equal(sweep, merged);
        }
        finally
        {
            File.Delete(file);
            foreach (var p in parts)
            {
                File.Delete(p);
            }
        }
    }

    /// <summary>sweep --reweight-to replaces the scenario's targets; targets outside the sampled range are exit 2 naming them; bad ranges and quantum scenarios are refused.</summary>
    [Fact]
    public void Sweep_reweight_option_and_refusals()
    {
        string file = WriteScenario(Scenario);
        try
        {
            var (code, stdout, stderr) = RunArgs("sweep", file, "--reweight-to", "15..35:3", "--format", "json", "--quiet");
            Assert.True(code == 0, stderr);
            var temps = JsonDocument.Parse(stdout).RootElement.GetProperty("results").EnumerateArray().Skip(3).Select(r => r.GetProperty("temperature").GetDouble());
            Assert.Equal([15.0, 25, 35], temps);
            (code, _, stderr) = RunArgs("sweep", file, "--reweight-to", "5..35:3", "--quiet");
            Assert.Equal(2, code);
            Assert.Contains("$.sampling.reweightTo: targets cannot be reweighted: 5 K (outside the sampled 10–40 K)", stderr);
            (code, _, stderr) = RunArgs("sweep", file, "--reweight-to", "35..15:3", "--quiet");
            Assert.Equal(2, code);
            Assert.Contains("--reweight-to '35..15:3' is not a range of temperatures", stderr);
            string quantum = WriteScenario(Scenario.Replace("\"mass\": 50,", "\"mass\": 50, \"statistics\": \"quantum\",", StringComparison.Ordinal));
            (code, _, stderr) = RunArgs("run", quantum, "--quiet");
            File.Delete(quantum);
            Assert.Equal(2, code);
            Assert.Contains("$.sampling.reweightTo: reweighting across temperatures applies to classical statistics", stderr);
        }
        finally
        {
            File.Delete(file);
        }
    }
}
