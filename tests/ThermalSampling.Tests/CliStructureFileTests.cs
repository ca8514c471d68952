using System;
using System.IO;
using System.Linq;
using System.Text;
using System.Text.Json;
using ThermalSampling.Cli;
using Xunit;
using static ThermalSampling.Tests.CliHarness;

namespace ThermalSampling.Tests;

/// <summary>The structure landscape's file and movingAtom keys, and the site results' harmonic covariance.</summary>
public class CliStructureFileTests
{
    /// <summary>An invented rock-salt-like crystal (cell 5.0 Å; labels Na1 and Cl1, type symbols Na and Cl), for the test only.</summary>
    private const string Cif = InventedStructures.RockSaltCif;

    private static string Scenario(string file, string moving) => $$"""
        {
          "title": "invented rock-salt-like crystal, the Na site among its Cl neighbours",
          "mass": 23,
          "potential": { "form": "lennard-jones", "wellDepth": 0.02, "equilibriumDistance": 2.5 },
          "landscape": { "kind": "structure", "file": "{{file}}", "movingAtom": {{moving}}, "cutoff": 2.6, "species": ["Cl"],
                         "confinement": { "shape": "sphere", "radius": 0.6 } },
          "temperatures": [100],
          "sampling": { "chains": 2, "samplesPerChain": 4000, "burnIn": 1000, "seed": 3 }
        }
        """;

    /// <summary>
    /// A CIF named by a path relative to the scenario file and the moving atom by its atom-site label: the Na site has its
    /// six Cl neighbours at 2.5 Å, the document carries the file's text (so it reproduces alone), and the site result has
    /// the 3×3 harmonic covariance. A missing file and an unknown label are named (exit 2).
    /// </summary>
    [Fact]
    public void A_cif_file_relative_to_the_scenario_and_a_site_label()
    {
        string dir = Path.Combine(Path.GetTempPath(), $"ts-structure-{Guid.NewGuid():N}");
        Directory.CreateDirectory(Path.Combine(dir, "structures"));
        try
        {
            File.WriteAllText(Path.Combine(dir, "structures", "salt.cif"), Cif);
            string scenario = Path.Combine(dir, "scenario.json");
            File.WriteAllText(scenario, Scenario("structures/salt.cif", "\"Na1\""));
            var (code, stdout, stderr) = RunArgs("run", scenario, "--format", "json", "--quiet");
            Assert.True(code == 0, stderr);
            var doc = JsonDocument.Parse(stdout).RootElement;
            Assert.Contains("data_invented_rocksalt", doc.GetProperty("input").GetProperty("landscape").GetProperty("cif").GetString());
            var harmonic = doc.GetProperty("results")[0].GetProperty("harmonic");
            var covariance = harmonic.GetProperty("covariance");
            Assert.Equal(3, covariance.GetArrayLength());
            Assert.Equal(harmonic.GetProperty("meanSquareDisplacement").GetDouble(), Enumerable.Range(0, 3).Sum(i => covariance[i][i].GetDouble()), 12);
            // The same site by number (Na1 is the first expanded atom).
            File.WriteAllText(scenario, Scenario("structures/salt.cif", "1"));
            Assert.Equal(0, RunArgs("run", scenario, "--format", "json", "--quiet").Code);

            File.WriteAllText(scenario, Scenario("structures/missing.cif", "\"Na1\""));
            (code, _, stderr) = RunArgs("run", scenario, "--quiet");
            Assert.Equal(2, code);
            Assert.Contains("$.landscape.file: the structure file 'structures/missing.cif' does not exist", stderr);
            File.WriteAllText(scenario, Scenario("structures/salt.cif", "\"K1\""));
            (code, _, stderr) = RunArgs("run", scenario, "--quiet");
            Assert.Equal(2, code);
            Assert.Contains("$.landscape.movingAtom: 'K1' is not an atom of the structure (its atoms: Na1, Cl1)", stderr);
        }
        finally
        {
            Directory.Delete(dir, recursive: true);
        }
    }

    private static string PairsScenario(string pairs, string extra = "") => $$"""
        {
          "title": "invented rock-salt-like crystal, the Na site with species pairs",
          "mass": 23,{{extra}}
          "landscape": { "kind": "structure", "file": "salt.cif", "movingAtom": "Na1", "cutoff": 3.6,
                         "pairs": {{pairs}},
                         "confinement": { "shape": "sphere", "radius": 0.6 } },
          "temperatures": [100],
          "sampling": { "chains": 2, "samplesPerChain": 4000, "burnIn": 1000, "seed": 3 }
        }
        """;

    /// <summary>
    /// Species pairs: a structure site among six Cl and twelve Na neighbours with only the Na–Cl pair given equals the
    /// one-species site of the six Cl with the same potential, to the last bit (the Na neighbours have no short-range
    /// term and add zeros); validate lists how each species acts; a pair naming a species not in the file and pairs beside
    /// a top-level potential are refused by path; charges add the Coulomb term, and a charged cell is refused.
    /// </summary>
    [Fact]
    public void Species_pairs_give_each_neighbour_species_its_potential()
    {
        string dir = Path.Combine(Path.GetTempPath(), $"ts-pairs-{Guid.NewGuid():N}");
        Directory.CreateDirectory(dir);
        try
        {
            File.WriteAllText(Path.Combine(dir, "salt.cif"), Cif);
            string scenario = Path.Combine(dir, "scenario.json");
            const string naCl = """[{ "between": ["Na", "Cl"], "potential": { "form": "lennard-jones", "wellDepth": 0.02, "equilibriumDistance": 2.5 } }]""";
            File.WriteAllText(scenario, PairsScenario(naCl));
            var (code, stdout, stderr) = RunArgs("run", scenario, "--format", "json", "--quiet");
            Assert.True(code == 0, stderr);
            double pairsMsd = JsonDocument.Parse(stdout).RootElement.GetProperty("results")[0].GetProperty("meanSquareDisplacement").GetDouble();
            (code, _, stderr) = RunArgs("validate", scenario);
            Assert.Equal(0, code);
            Assert.Contains("pair Na–Cl: short-range lennard-jones (6 neighbours)", stderr);
            Assert.Contains("pair Na–Na: not at all (no pair given, no charge; 12 neighbours)", stderr);

            File.WriteAllText(Path.Combine(dir, "one.json"), Scenario("salt.cif", "\"Na1\"").Replace("2.6", "3.6", StringComparison.Ordinal));
            (code, stdout, stderr) = RunArgs("run", Path.Combine(dir, "one.json"), "--format", "json", "--quiet");
            Assert.True(code == 0, stderr);
            Assert.Equal(pairsMsd, JsonDocument.Parse(stdout).RootElement.GetProperty("results")[0].GetProperty("meanSquareDisplacement").GetDouble());

            File.WriteAllText(scenario, PairsScenario(naCl.Replace("\"Cl\"]", "\"K\"]", StringComparison.Ordinal)));
            (code, _, stderr) = RunArgs("run", scenario, "--quiet");
            Assert.Equal(2, code);
            Assert.Contains("$.landscape.pairs[0].between: species 'K' is not in the structure", stderr);
            File.WriteAllText(scenario, PairsScenario(naCl, "\n  \"potential\": { \"form\": \"morse\", \"wellDepth\": 0.1, \"width\": 1.5, \"equilibriumDistance\": 2.5 },"));
            (code, _, stderr) = RunArgs("run", scenario, "--quiet");
            Assert.Equal(2, code);
            Assert.Contains("$.potential: give the potentials once", stderr);
            // Charges add the Coulomb term (Ewald, as a polynomial about the site): the run works, validate says how each
            // species acts, the Coulomb energy has no Hessian at this cubic site, so the MSD moves little; a charged cell is refused.
            File.WriteAllText(scenario, PairsScenario(naCl).Replace("\"cutoff\": 3.6,", "\"cutoff\": 3.6, \"charges\": { \"Na\": 1, \"Cl\": -1 },", StringComparison.Ordinal));
            (code, stdout, stderr) = RunArgs("run", scenario, "--format", "json", "--quiet");
            Assert.True(code == 0, stderr);
            double withCoulomb = JsonDocument.Parse(stdout).RootElement.GetProperty("results")[0].GetProperty("meanSquareDisplacement").GetDouble();
            var resolvedPairs = JsonDocument.Parse(stdout).RootElement.GetProperty("resolved").GetProperty("pairs").EnumerateArray().Select(p => p.GetString()).ToList();
            Assert.Contains("Na–Na: Coulomb only (12 neighbours)", resolvedPairs);
            Assert.InRange(withCoulomb / pairsMsd, 0.8, 1.25);
            (code, _, stderr) = RunArgs("validate", scenario);
            Assert.Equal(0, code);
            Assert.Contains("pair Na–Cl: short-range lennard-jones and Coulomb (6 neighbours)", stderr);
            Assert.Contains("pair Na–Na: Coulomb only (12 neighbours)", stderr);
            Assert.Contains("pair Coulomb: Ewald field of the whole crystal about the site", stderr);
            File.WriteAllText(scenario, PairsScenario(naCl).Replace("\"cutoff\": 3.6,", "\"cutoff\": 3.6, \"charges\": { \"Na\": 1, \"Cl\": -0.5 },", StringComparison.Ordinal));
            (code, _, stderr) = RunArgs("run", scenario, "--quiet");
            Assert.Equal(2, code);
            Assert.Contains("$.landscape.charges: the cell is not neutral: its net charge is 2 e", stderr);
        }
        finally
        {
            Directory.Delete(dir, recursive: true);
        }
    }

    /// <summary>
    /// Mixing: like pairs [Na, Na] and [Cl, Cl] (Lennard-Jones) with "mixing": "lorentz-berthelot" give the Na–Cl pair
    /// σ = (σ_Na + σ_Cl)/2, ε = √(ε_Na ε_Cl): the same bits as that pair given by hand, and validate names the rule; a rule
    /// that does not combine the forms is refused.
    /// </summary>
    [Fact]
    public void Mixed_pairs_equal_the_pairs_given_by_hand()
    {
        string dir = Path.Combine(Path.GetTempPath(), $"ts-mixing-{Guid.NewGuid():N}");
        Directory.CreateDirectory(dir);
        try
        {
            File.WriteAllText(Path.Combine(dir, "salt.cif"), Cif);
            string scenario = Path.Combine(dir, "scenario.json");
            const string like = """[{ "between": ["Na", "Na"], "potential": { "form": "lennard-jones", "sigma": 2.4, "epsilon": 0.01 } }, { "between": ["Cl", "Cl"], "potential": { "form": "lennard-jones", "sigma": 3.2, "epsilon": 0.04 } }]""";
            File.WriteAllText(scenario, PairsScenario(like).Replace("\"cutoff\": 3.6,", "\"cutoff\": 3.6, \"mixing\": \"lorentz-berthelot\",", StringComparison.Ordinal));
            var (code, mixedOut, stderr) = RunArgs("run", scenario, "--format", "json", "--quiet");
            Assert.True(code == 0, stderr);
            (code, _, stderr) = RunArgs("validate", scenario);
            Assert.Contains("pair Na–Cl: short-range lennard-jones (Lorentz–Berthelot mixing) (6 neighbours)", stderr);
            string sigma = (0.5 * (2.4 + 3.2)).ToString("R", System.Globalization.CultureInfo.InvariantCulture);
            string epsilon = Math.Sqrt(0.01 * 0.04).ToString("R", System.Globalization.CultureInfo.InvariantCulture);
            string byHand = $$"""[{ "between": ["Na", "Cl"], "potential": { "form": "lennard-jones", "sigma": {{sigma}}, "epsilon": {{epsilon}} } }, { "between": ["Na", "Na"], "potential": { "form": "lennard-jones", "sigma": 2.4, "epsilon": 0.01 } }]""";
            File.WriteAllText(scenario, PairsScenario(byHand));
            (code, string handOut, stderr) = RunArgs("run", scenario, "--format", "json", "--quiet");
            Assert.True(code == 0, stderr);
            double Msd(string json) => JsonDocument.Parse(json).RootElement.GetProperty("results")[0].GetProperty("meanSquareDisplacement").GetDouble();
            Assert.Equal(Msd(handOut), Msd(mixedOut));
            File.WriteAllText(scenario, PairsScenario(like).Replace("\"cutoff\": 3.6,", "\"cutoff\": 3.6, \"mixing\": \"geometric\",", StringComparison.Ordinal));
            (code, _, stderr) = RunArgs("run", scenario, "--quiet");
            Assert.Equal(2, code);
            Assert.Contains("cannot combine the [Na, Na] lennard-jones pair", stderr);
        }
        finally
        {
            Directory.Delete(dir, recursive: true);
        }
    }
}
