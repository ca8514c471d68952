using System;
using System.IO;
using System.Linq;
using System.Text;
using System.Text.Json;
using ThermalSampling.Cli;
using Xunit;
using static ThermalSampling.Tests.CliHarness;

namespace ThermalSampling.Tests;

/// <summary>The scenario contract of replica exchange: "method": "replica-exchange", its ladder and diagnostics.swapAcceptance.</summary>
public class CliReplicaExchangeTests
{
    /// <summary>An invented Lennard-Jones pair (15 meV at 3.5 Å) of 50 u on [3.0, 5.0] Å at 10 and 40 K, as one automatic ladder.</summary>
    private const string Scenario = """
        {
          "title": "invented ladder",
          "mass": 50,
          "potential": { "form": "lennard-jones", "wellDepth": 0.015, "equilibriumDistance": 3.5 },
          "landscape": { "kind": "line", "window": [3.0, 5.0] },
          "temperatures": [10, 40],
          "sampling": { "method": "replica-exchange", "ladder": "auto", "targetSwapAcceptance": 0.7, "swapInterval": 20,
                        "chains": 4, "samplesPerChain": 9000, "burnIn": 1000, "seed": 3 }
        }
        """;

    [Fact]
    public void A_ladder_reports_every_rung_with_its_swap_acceptance_and_resumes_from_its_checkpoint()
    {
        string file = WriteScenario(Scenario);
        string checkpoint = file + ".checkpoint";
        try
        {
            var (code, stdout, stderr) = RunArgs("run", file, "--format", "json", "--quiet");
            Assert.True(code == 0, stderr);
            var root = JsonDocument.Parse(stdout).RootElement;
            var ladder = root.GetProperty("ladder");
            Assert.Equal("auto", ladder.GetProperty("mode").GetString());
            var rungs = ladder.GetProperty("temperatures").EnumerateArray().Select(t => t.GetDouble()).ToList();
            Assert.True(rungs.Count > 2, $"{rungs.Count} rungs");
            Assert.Equal(10, rungs[0]);
            Assert.Equal(40, rungs[^1]);
            Assert.Equal(rungs.Skip(1).SkipLast(1), ladder.GetProperty("added").EnumerateArray().Select(t => t.GetDouble()));
            Assert.All(ladder.GetProperty("predictedSwapAcceptance").EnumerateArray(), a => Assert.InRange(a.GetDouble(), 0.7, 1));
            Assert.Equal("replica-exchange", root.GetProperty("resolved").GetProperty("sampling").GetProperty("method").GetString());
            var results = root.GetProperty("results").EnumerateArray().ToList();
            Assert.Equal(rungs, results.Select(r => r.GetProperty("temperature").GetDouble()));
            for (int k = 0; k < results.Count; k++)
            {
                var diagnostics = results[k].GetProperty("diagnostics");
                Assert.Equal(k < results.Count - 1, diagnostics.TryGetProperty("swapAcceptance", out var swap));
                if (k < results.Count - 1)
                {
                    Assert.InRange(swap.GetDouble(), 0.6, 1);
                }
                var x = diagnostics.GetProperty("replicaExchange");
                Assert.Equal(k, x.GetProperty("rung").GetInt32());
                Assert.Equal(20, x.GetProperty("swapInterval").GetInt32());
                Assert.True(x.GetProperty("roundTrips").GetInt64() > 0);
                foreach (var key in new[] { "mean", "variance", "exact", "harmonic", "distribution" })
                {
                    Assert.True(results[k].TryGetProperty(key, out _), $"rung {k} lacks {key}");
                }
            }
            var (checkpointCode, checkpointed, checkpointErr) = RunArgs("run", file, "--format", "json", "--quiet", "--checkpoint", checkpoint, "--checkpoint-every", "1s");
            Assert.True(checkpointCode == 0, checkpointErr);
            Assert.Equal(stdout, checkpointed);
            var (resumeCode, resumed, resumeErr) = RunArgs("resume", checkpoint, "--quiet");
            Assert.True(resumeCode == 0, resumeErr);
            Assert.Equal(stdout, resumed);
        }
        finally
        {
            File.Delete(file);
            File.Delete(checkpoint);
        }
    }

    [Theory]
    [InlineData("\"temperatures\": [10, 40]", "\"temperatures\": [40, 10]", "$.temperatures: a replica-exchange ladder lists its temperatures from the coldest to the hottest.")]
    [InlineData("\"temperatures\": [10, 40]", "\"temperatures\": [10]", "$.temperatures: replica exchange runs the temperatures as one ladder and needs at least two.")]
    [InlineData("\"method\": \"replica-exchange\"", "\"method\": \"metropolis\"", "$.sampling.ladder: applies only with \"method\": \"replica-exchange\".")]
    [InlineData("\"targetSwapAcceptance\": 0.7", "\"targetSwapAcceptance\": 1.5", "$.sampling.targetSwapAcceptance")]
    [InlineData("\"swapInterval\": 20", "\"swapInterval\": 0", "$.sampling.swapInterval")]
    [InlineData("\"ladder\": \"auto\"", "\"ladder\": \"sometimes\"", "$.sampling.ladder")]
    [InlineData("\"mass\": 50,", "\"mass\": 50, \"statistics\": \"quantum\",", "$.sampling.method: replica exchange swaps classical configurations")]
    [InlineData("\"seed\": 3 }", "\"seed\": 3, \"reweightTo\": { \"from\": 12, \"to\": 30, \"count\": 3 } }", "$.sampling.reweightTo: reweighting is not offered with replica exchange yet")]
    public void A_ladder_scenario_with_a_wrong_key_is_refused_naming_it(string from, string to, string message)
    {
        string file = WriteScenario(Scenario.Replace(from, to, StringComparison.Ordinal));
        try
        {
            var (code, _, stderr) = RunArgs("run", file, "--quiet");
            Assert.Equal(2, code);
            Assert.Contains(message, stderr);
        }
        finally
        {
            File.Delete(file);
        }
    }

    [Fact]
    public void A_ladder_is_not_split_into_shards()
    {
        string file = WriteScenario(Scenario);
        string part = file + ".part";
        try
        {
            var (code, _, stderr) = RunArgs("sweep", file, "--shard", "1/2", "--output", part, "--quiet");
            Assert.Equal(2, code);
            Assert.Contains("$.sampling.method: a replica-exchange ladder runs all its temperatures together and cannot be split into shards", stderr);
        }
        finally
        {
            File.Delete(file);
            File.Delete(part);
        }
    }
}
