using System;
using System.IO;
using System.Linq;
using System.Text;
using System.Text.Json;
using ThermalSampling.Cli;
using Xunit;

namespace ThermalSampling.Tests;

/// <summary>The scenario contract of quantum statistics: "statistics": "quantum" and its keys.</summary>
public class CliQuantumTests
{
    /// <summary>An invented Morse pair (0.3 eV, 1.8/Å, 2 Å) of 2 u at 30 K: strongly quantum.</summary>
    private const string LineScenario = """
        {
          "title": "invented quantum Morse pair",
          "mass": 2,
          "statistics": "quantum",
          "potential": { "form": "morse", "wellDepth": 0.3, "width": 1.8, "equilibriumDistance": 2.0 },
          "landscape": { "kind": "line", "window": [1.2, 4.5] },
          "temperatures": [30],
          "sampling": { "chains": 4, "samplesPerChain": 10000, "burnIn": 2000, "seed": 3 }
        }
        """;

    private static (int Code, string Stdout, string Stderr) Run(string scenarioJson, params string[] extra)
    {
        string file = Path.Combine(Path.GetTempPath(), $"ts-{Guid.NewGuid():N}.json");
        File.WriteAllText(file, scenarioJson);
        try
        {
            using var stdout = new MemoryStream();
            using var stderr = new StringWriter();
            int code = Program.Run(new[] { "run", file }.Concat(extra).ToArray(), stdout, stderr);
            return (code, Encoding.UTF8.GetString(stdout.ToArray()), stderr.ToString());
        }
        finally
        {
            File.Delete(file);
        }
    }

    [Fact]
    public void A_quantum_line_run_writes_the_contract_keys()
    {
        var (code, stdout, stderr) = Run(LineScenario, "--format", "json");
        Assert.True(code == 0, stderr);
        var r = JsonDocument.Parse(stdout).RootElement.GetProperty("results")[0];
        foreach (var key in new[] { "mean", "meanShift", "variance", "rms", "meanShiftStdErr", "varianceStdErr", "rmsStdErr", "exact", "classical", "quantum", "warnings" })
        {
            Assert.True(r.TryGetProperty(key, out _), $"missing {key}");
        }
        var exact = r.GetProperty("exact");
        foreach (var key in new[] { "mean", "variance", "skewness", "excessKurtosis" })
        {
            Assert.True(exact.TryGetProperty(key, out _), $"missing exact.{key}");
        }
        var classical = r.GetProperty("classical");
        foreach (var key in new[] { "mean", "meanShift", "variance", "rms" })
        {
            Assert.True(classical.TryGetProperty(key, out _), $"missing classical.{key}");
        }
        var q = r.GetProperty("quantum");
        Assert.Equal(64, q.GetProperty("beads").GetInt32()); // ħω/kT = 24.7 → 2·24.7 → 64
        Assert.True(q.GetProperty("extrapolated").GetBoolean());
        Assert.True(q.GetProperty("zeroPointVariance").GetDouble() > 0);
        Assert.Equal(JsonValueKind.True, q.GetProperty("converged").ValueKind);
        // The main values are the quantum ones: near the exact grid, far above the classical.
        double variance = r.GetProperty("variance").GetDouble(), se = r.GetProperty("varianceStdErr").GetDouble();
        Assert.True(Math.Abs(variance - exact.GetProperty("variance").GetDouble()) < 4 * se);
        Assert.True(variance > 5 * classical.GetProperty("variance").GetDouble());
        Assert.Contains(r.GetProperty("warnings").EnumerateArray(), w => w.GetProperty("code").GetString()!.Contains("quantum", StringComparison.Ordinal));
    }

    [Fact]
    public void Bad_quantum_inputs_exit_2_naming_the_path()
    {
        var (code, _, stderr) = Run(LineScenario.Replace("\"statistics\": \"quantum\",", "\"statistics\": \"quantum\", \"beads\": 12,", StringComparison.Ordinal));
        Assert.Equal(2, code);
        Assert.Contains("$.beads: 12 is not a power of two", stderr);
        (code, _, stderr) = Run(LineScenario.Replace("\"mass\": 2,", "", StringComparison.Ordinal));
        Assert.Equal(2, code);
        Assert.Contains("$.mass", stderr);
        (code, _, stderr) = Run(LineScenario.Replace("\"seed\": 3", "\"seed\": 3, \"method\": \"direct\"", StringComparison.Ordinal));
        Assert.Equal(2, code);
        Assert.Contains("$.sampling.method", stderr);
        (code, _, stderr) = Run(LineScenario.Replace("\"quantum\"", "\"quantal\"", StringComparison.Ordinal));
        Assert.Equal(2, code);
        Assert.Contains("$.statistics", stderr);
    }
}
