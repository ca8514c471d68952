using System;
using System.IO;
using System.Linq;
using System.Text;
using ThermalSampling.Analysis;
using ThermalSampling.Cli;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Sampling;
using ThermalSampling.Units;
using Xunit;

namespace ThermalSampling.Tests;

/// <summary>
/// A corpus of bad inputs. Every one must give a specific, clear error: through the CLI exit code 2 and a message naming
/// the JSON path (or the line and column), no stack trace; through the API an exception naming the parameter.
/// </summary>
public class HostileInputTests
{
    internal const string Base = """
        {
          "mass": 39.9,
          "potential": { "form": "lennard-jones", "wellDepth": 0.0120, "equilibriumDistance": 3.50 },
          "landscape": { "kind": "line", "window": [3.0, 6.0] },
          "temperatures": [10, 40],
          "sampling": { "chains": 2, "samplesPerChain": 1000, "burnIn": 100, "seed": 7 }
        }
        """;

    internal const string Sites = """
        {
          "mass": 39.9,
          "potential": { "form": "lennard-jones", "wellDepth": 0.0120, "equilibriumDistance": 3.50 },
          "landscape": { "kind": "sites", "sites": [[3.5, 0, 0], [-3.5, 0, 0], [0, 3.5, 0], [0, -3.5, 0], [0, 0, 3.5], [0, 0, -3.5]], "confinement": { "shape": "sphere", "radius": 1.0 } },
          "temperatures": [10],
          "sampling": { "chains": 2, "samplesPerChain": 1000, "burnIn": 100, "seed": 7 }
        }
        """;

    private static (int Code, string Stderr, string Stdout) RunFile(byte[] content)
    {
        string file = Path.Combine(Path.GetTempPath(), $"ts-hostile-{Guid.NewGuid():N}.json");
        File.WriteAllBytes(file, content);
        try
        {
            using var stdout = new MemoryStream();
            using var stderr = new StringWriter();
            int code = Program.Run(new[] { "run", file, "--quiet" }, stdout, stderr);
            return (code, stderr.ToString(), Encoding.UTF8.GetString(stdout.ToArray()));
        }
        finally
        {
            File.Delete(file);
        }
    }

    public static TheoryData<string, string, string, string> Mutations => new()
    {
        // (base, find, replace, expected text in the message)
        { "line", "\"mass\": 39.9", "\"mass\": 0", "$.mass" },
        { "line", "\"mass\": 39.9", "\"mass\": -39.9", "$.mass" },
        { "line", "\"mass\": 39.9", "\"mass\": 1e300", "$.mass" },
        { "line", "\"mass\": 39.9", "\"mass\": 6.6e-26", "not kg" },
        { "line", "\"mass\": 39.9", "\"mass\": 40000", "in atomic mass units" },
        { "line", "\"mass\": 39.9", "\"mass\": 1e999", "$.mass" },
        { "line", "\"mass\": 39.9", "\"mass\": NaN", "line 2" },
        { "line", "\"mass\": 39.9", "\"mass\": Infinity", "line 2" },
        { "line", "\"mass\": 39.9", "\"mass\": \"heavy\"", "$.mass" },
        { "line", "\"mass\": 39.9", "\"mass\": null", "$.mass" },
        { "line", "\"temperatures\": [10, 40]", "\"temperatures\": [0]", "$.temperatures[0]" },
        { "line", "\"temperatures\": [10, 40]", "\"temperatures\": [-5]", "$.temperatures[0]" },
        { "line", "\"temperatures\": [10, 40]", "\"temperatures\": [1e300]", "$.temperatures[0]" },
        { "line", "\"temperatures\": [10, 40]", "\"temperatures\": []", "$.temperatures" },
        { "line", "\"temperatures\": [10, 40]", "\"temperatures\": [40, 40]", "$.temperatures" },
        { "line", "\"temperatures\": [10, 40]", "\"temperatures\": 40", "$.temperatures" },
        { "line", "\"window\": [3.0, 6.0]", "\"window\": [6.0, 3.0]", "$.landscape.window" },
        { "line", "\"window\": [3.0, 6.0]", "\"window\": [3.0, 3.0]", "$.landscape.window" },
        { "line", "\"window\": [3.0, 6.0]", "\"window\": [-1.0, 6.0]", "$.landscape.window[0]" },
        { "line", "\"window\": [3.0, 6.0]", "\"window\": [3.0, 6.0, 9.0]", "$.landscape.window" },
        { "line", "\"wellDepth\": 0.0120", "\"wellDepth\": 0", "$.potential.wellDepth" },
        { "line", "\"wellDepth\": 0.0120", "\"wellDepth\": -0.012", "$.potential.wellDepth" },
        { "line", "\"equilibriumDistance\": 3.50", "\"equilibriumDistance\": 0", "$.potential.equilibriumDistance" },
        { "line", "\"equilibriumDistance\": 3.50 }", "\"equilibriumDistance\": 3.50, \"sigma\": 3.1 }", "not both" },
        { "line", "\"form\": \"lennard-jones\", \"wellDepth\": 0.0120, \"equilibriumDistance\": 3.50", "\"form\": \"morse\", \"wellDepth\": 0.3, \"width\": 0, \"equilibriumDistance\": 3.5", "$.potential.width" },
        { "line", "\"form\": \"lennard-jones\", \"wellDepth\": 0.0120, \"equilibriumDistance\": 3.50", "\"form\": \"buckingham\", \"A\": -1, \"rho\": 0.2, \"C\": 10", "$.potential.A" },
        { "line", "\"form\": \"lennard-jones\", \"wellDepth\": 0.0120, \"equilibriumDistance\": 3.50", "\"form\": \"buckingham\", \"A\": 1000, \"rho\": 0.2, \"C\": -10", "$.potential.C" },
        { "line", "\"form\": \"lennard-jones\", \"wellDepth\": 0.0120, \"equilibriumDistance\": 3.50", "\"form\": \"buckingham\", \"A\": 1, \"rho\": 0.1, \"C\": 1000", "$.potential" },
        { "line", "\"form\": \"lennard-jones\", \"wellDepth\": 0.0120, \"equilibriumDistance\": 3.50", "\"form\": \"harmonic\", \"stiffness\": 0, \"equilibriumDistance\": 3.5", "$.potential.stiffness" },
        { "line", "\"form\": \"lennard-jones\", \"wellDepth\": 0.0120, \"equilibriumDistance\": 3.50", "\"form\": \"table\", \"r\": [3, 4, 4, 5, 6], \"energy\": [1, 0, 0, 1, 2]", "$.potential.r[2]" },
        { "line", "\"form\": \"lennard-jones\", \"wellDepth\": 0.0120, \"equilibriumDistance\": 3.50", "\"form\": \"table\", \"r\": [3, 5, 4, 6, 7], \"energy\": [1, 0, 0, 1, 2]", "$.potential.r[2]" },
        { "line", "\"form\": \"lennard-jones\", \"wellDepth\": 0.0120, \"equilibriumDistance\": 3.50", "\"form\": \"table\", \"r\": [3, 4, 5], \"energy\": [1, 0, 1]", "$.potential.r" },
        { "line", "\"form\": \"lennard-jones\", \"wellDepth\": 0.0120, \"equilibriumDistance\": 3.50", "\"form\": \"table\", \"r\": [3, 4, 5, 6, 7], \"energy\": [1, 0, 1]", "$.potential.energy" },
        { "line", "\"form\": \"lennard-jones\", \"wellDepth\": 0.0120, \"equilibriumDistance\": 3.50", "\"form\": \"table\", \"r\": [3.5, 4, 4.5, 5, 5.5], \"energy\": [1, -1, 0, 1, 2]", "$.landscape.window" },
        { "line", "\"form\": \"lennard-jones\", \"wellDepth\": 0.0120, \"equilibriumDistance\": 3.50", "\"wellDepth\": 0.0120", "$.potential.form" },
        { "line", "\"seed\": 7", "\"seed\": -7", "$.sampling.seed" },
        { "line", "\"seed\": 7", "\"seed\": \"seven\"", "$.sampling.seed" },
        { "line", "\"seed\": 7 }", "\"seed\": 7, \"thinning\": 3 }", "$.sampling.thinning" },
        { "line", "\"samplesPerChain\": 1000", "\"samplesPerChain\": 5", "$.sampling.samplesPerChain" },
        { "line", "\"burnIn\": 100", "\"burnIn\": -1", "$.sampling.burnIn" },
        { "line", "\"chains\": 2", "\"chains\": 100000", "$.sampling.chains" },
        { "line", "\"kind\": \"line\"", "\"kind\": \"sites\"", "$.landscape" },
        { "sites", "[[3.5, 0, 0], [-3.5, 0, 0]", "[[3.5, 0, 0], [3.5, 0, 0]", "on top of each other" },
        { "sites", "[[3.5, 0, 0], [-3.5, 0, 0]", "[[0, 0, 0], [-3.5, 0, 0]", "coincides with the centre" },
        { "sites", "[[3.5, 0, 0], [-3.5, 0, 0]", "[[3.5, 0], [-3.5, 0, 0]", "$.landscape.sites[0]" },
        { "sites", "\"radius\": 1.0", "\"radius\": 0", "$.landscape.confinement.radius" },
        { "sites", "\"shape\": \"sphere\"", "\"shape\": \"cylinder\"", "$.landscape.confinement.shape" },
        { "sites", "\"sites\": [[3.5, 0, 0]", "\"lattice\": \"fcc\", \"sites\": [[3.5, 0, 0]", "exactly one of" },
    };

    [Theory]
    [MemberData(nameof(Mutations))]
    public void Bad_scenarios_exit_2_with_a_specific_message(string which, string find, string replace, string expected)
    {
        string source = which == "sites" ? Sites : Base;
        Assert.Contains(find, source);
        var (code, stderr, stdout) = RunFile(Encoding.UTF8.GetBytes(source.Replace(find, replace, StringComparison.Ordinal)));
        Assert.Equal(Program.InvalidInput, code);
        Assert.Contains(expected, stderr);
        Assert.DoesNotContain("   at ", stderr);
        Assert.Empty(stdout);
    }

    [Fact]
    public void A_million_temperatures_are_refused_without_running()
    {
        string many = "[" + string.Join(",", Enumerable.Range(1, 1_000_000)) + "]";
        var (code, stderr, _) = RunFile(Encoding.UTF8.GetBytes(Base.Replace("[10, 40]", many)));
        Assert.Equal(2, code);
        Assert.Contains("$.temperatures", stderr);
        Assert.Contains("1000000 entries", stderr);
    }

    [Fact]
    public void Deeply_nested_json_is_refused_with_its_position()
    {
        string nested = new string('[', 5000) + new string(']', 5000);
        var (code, stderr, _) = RunFile(Encoding.UTF8.GetBytes(Base.Replace("\"title\"", "\"x\"").Replace("\"mass\": 39.9", "\"mass\": " + nested)));
        Assert.Equal(2, code);
        Assert.Contains("line", stderr);
        Assert.Contains("column", stderr);
    }

    [Fact]
    public void A_100_megabyte_file_is_refused_before_it_is_read()
    {
        string file = Path.Combine(Path.GetTempPath(), $"ts-huge-{Guid.NewGuid():N}.json");
        using (var f = File.Create(file))
        {
            f.SetLength(100L * 1024 * 1024); // sparse: costs no time or disk
        }
        try
        {
            using var stdout = new MemoryStream();
            using var stderr = new StringWriter();
            Assert.Equal(2, Program.Run(new[] { "run", file }, stdout, stderr));
            Assert.Contains("limited to", stderr.ToString());
        }
        finally
        {
            File.Delete(file);
        }
    }

    [Fact]
    public void Invalid_utf8_is_refused_with_its_position()
    {
        var bytes = Encoding.UTF8.GetBytes(Base.Replace("\"mass\": 39.9", "\"title\": \"\u00e9\", \"mass\": 39.9")).ToList();
        int at = bytes.IndexOf(0xC3);
        bytes[at] = 0xFF; // not a UTF-8 lead byte
        var (code, stderr, _) = RunFile(bytes.ToArray());
        Assert.Equal(2, code);
        Assert.Contains("not valid UTF-8", stderr);
        Assert.Contains("line 2", stderr);
    }

    // API calls: each names the parameter.
    private static readonly LennardJones Lj = LennardJones.FromMinimum(Length.FromAngstroms(3.5), Energy.FromElectronVolts(0.012));

    [Fact]
    public void Api_refuses_bad_values_naming_the_parameter()
    {
        Assert.Equal("kelvin", Assert.Throws<ArgumentOutOfRangeException>(() => Temperature.FromKelvin(double.NaN)).ParamName);
        Assert.Equal("atomicMassUnits", Assert.Throws<ArgumentOutOfRangeException>(() => Mass.FromAtomicMassUnits(double.PositiveInfinity)).ParamName);
        Assert.Equal("wellDepth", Assert.Throws<ArgumentOutOfRangeException>(() => new Morse(Energy.FromElectronVolts(-1), 1, Length.FromAngstroms(2))).ParamName);
        Assert.Equal("rho", Assert.Throws<ArgumentOutOfRangeException>(() => new Buckingham(Energy.FromElectronVolts(1), Length.FromAngstroms(0), 1)).ParamName);
        Assert.Equal("stiffnessElectronVoltsPerAngstromSquared", Assert.Throws<ArgumentOutOfRangeException>(() => new HarmonicBond(double.NaN, Length.FromAngstroms(1))).ParamName);
        Assert.Equal("cutOff", Assert.Throws<ArgumentOutOfRangeException>(() => new CutOffPotential<LennardJones>(Lj, Length.FromAngstroms(-1))).ParamName);
        Assert.Equal("temperatures", Assert.Throws<ArgumentException>(() => PairSampler.Sweep(PairLandscape.Line(Lj, Length.FromAngstroms(3), Length.FromAngstroms(6)),
            Mass.FromAtomicMassUnits(40), new[] { Temperature.FromKelvin(10), Temperature.FromKelvin(10) }, new SamplingSettings { Seed = 1 })).ParamName);
        Assert.Equal("temperature", Assert.Throws<ArgumentOutOfRangeException>(() => ExactPairDistribution.Compute(PairLandscape.Line(Lj, Length.FromAngstroms(3), Length.FromAngstroms(6)), default)).ParamName);
    }

    [Fact]
    public void A_delegate_that_returns_NaN_or_throws_inside_the_window_stops_the_sampler_clearly()
    {
        // NaN at the end of the domain is caught when the potential is built (its well depth needs that energy) ...
        var early = Assert.Throws<NonFiniteEnergyException>(() => new FunctionPotential(r => r > 4.2 ? double.NaN : Lj.Energy(r), Length.FromAngstroms(3), Length.FromAngstroms(6), Lj.Derivatives, "NaN beyond 4.2 Å"));
        Assert.Contains("NaN beyond 4.2", early.Message);
        // ... and NaN in a narrow band inside the window when the sampler prepares its reference.
        var nan = new FunctionPotential(r => r > 4.60 && r < 4.62 ? double.NaN : Lj.Energy(r), Length.FromAngstroms(3), Length.FromAngstroms(6), Lj.Derivatives, "NaN near 4.61 Å");
        var landscape = PairLandscape.Line(nan, Length.FromAngstroms(3.0), Length.FromAngstroms(6.0));
        var ex = Assert.Throws<NonFiniteEnergyException>(() => PairSampler.Run(landscape, Mass.FromAtomicMassUnits(40), Temperature.FromKelvin(40), new SamplingSettings { Seed = 1, SamplesPerChain = 1000 }));
        Assert.Contains("NaN near 4.61", ex.Message);
        Assert.InRange(ex.Separation, 4.60, 4.62);
        // A delegate that throws: the user's own exception comes through unchanged, as early as the potential is built.
        var thrown = Assert.Throws<InvalidOperationException>(() => new FunctionPotential(
            r => r > 5.5 ? throw new InvalidOperationException("fit undefined beyond 5.5 Å") : Lj.Energy(r), Length.FromAngstroms(3), Length.FromAngstroms(6), Lj.Derivatives));
        Assert.Contains("fit undefined", thrown.Message);
    }

    [Fact]
    public void Extreme_temperatures_give_correct_answers_or_clear_warnings()
    {
        var landscape = PairLandscape.Radial(Lj, Length.FromAngstroms(0.0), Length.FromAngstroms(8.0)); // r → 0: the LJ wall overflows to +∞, weight 0
        var cold = PairSampler.Run(landscape, Mass.FromAtomicMassUnits(40), Temperature.FromKelvin(1e-3), new SamplingSettings { Seed = 2, SamplesPerChain = 20_000 });
        Assert.True(Math.Abs(cold.Exact.ZScoreMean) < 4);
        Assert.Contains(cold.Warnings, w => w.Code == WarningCodes.QuantumEffects);
        var hot = PairSampler.Run(landscape, Mass.FromAtomicMassUnits(40), Temperature.FromKelvin(1e5), new SamplingSettings { Seed = 2, SamplesPerChain = 20_000 });
        Assert.True(Math.Abs(hot.Exact.ZScoreMean) < 4);
        Assert.Contains(hot.Warnings, w => w.Code == WarningCodes.EscapeRisk);
        Assert.Contains(hot.Warnings, w => w.Code == WarningCodes.WallMass);
        Assert.True(double.IsFinite(hot.Mean.Value) && double.IsFinite(cold.Variance.Value));
    }
}
