using System;
using System.Diagnostics;
using System.IO;
using System.Linq;
using System.Text;
using System.Text.Json;
using ThermalSampling.Cli;
using Xunit;
using static ThermalSampling.Tests.CliHarness;

namespace ThermalSampling.Tests;

/// <summary>The command line and its JSON contract (keys and exit codes are a public contract).</summary>
public class CliTests
{
    private const string LineScenario = """
        {
          "title": "invented test pair",
          "units": { "energy": "eV", "length": "angstrom" },
          "mass": 39.9,
          "potential": { "form": "lennard-jones", "wellDepth": 0.0120, "equilibriumDistance": 3.50 },
          "landscape": { "kind": "line", "window": [3.0, 6.0] },
          "temperatures": [10, 40],
          "sampling": { "method": "metropolis", "chains": 2, "samplesPerChain": 5000, "burnIn": 1000, "seed": 7 }
        }
        """;

    private const string SiteScenario = """
        {
          "title": "invented test cage",
          "units": { "energy": "meV", "length": "nm" },
          "mass": 63.5,
          "potential": { "form": "morse", "wellDepth": 343, "width": 13.6, "equilibriumDistance": 0.2866 },
          "landscape": { "kind": "sites", "lattice": "fcc", "nearestNeighbourDistance": 0.2556, "confinement": { "shape": "sphere", "radius": 0.1 } },
          "temperatures": [300],
          "sampling": { "chains": 2, "samplesPerChain": 4000, "burnIn": 1000, "seed": 3 }
        }
        """;

    private static (int Code, string Stdout, string Stderr) Run(string scenarioJson, params string[] extra)
    {
        string file = Path.Combine(Path.GetTempPath(), $"ts-{Guid.NewGuid():N}.json");
        File.WriteAllText(file, scenarioJson);
        try
        {
            return RunArgs(new[] { "run", file }.Concat(extra).ToArray());
        }
        finally
        {
            File.Delete(file);
        }
    }

    private static void AssertKeys(JsonElement e, params string[] keys)
    {
        foreach (string k in keys)
        {
            Assert.True(e.TryGetProperty(k, out _), $"missing key '{k}' in {e}");
        }
    }

    [Fact]
    public void Line_run_writes_every_contract_key()
    {
        var (code, stdout, stderr) = Run(LineScenario, "--format", "json");
        Assert.True(code == 0, stderr);
        using var doc = JsonDocument.Parse(stdout);
        var root = doc.RootElement;
        AssertKeys(root, "title", "units", "libraryVersion", "input", "resolved", "results");
        Assert.Equal("invented test pair", root.GetProperty("title").GetString());
        // The inputs travel with the results: the scenario as given and what the run resolved from it.
        Assert.Equal("invented test pair", root.GetProperty("input").GetProperty("title").GetString());
        AssertKeys(root.GetProperty("input"), "mass", "potential", "landscape", "temperatures", "sampling");
        AssertKeys(root.GetProperty("resolved"), "mass", "temperatures");
        AssertKeys(root.GetProperty("resolved").GetProperty("sampling"), "method", "seed", "chains", "samplesPerChain", "burnIn", "histogramBins");
        Assert.Equal(root.GetProperty("input").GetProperty("sampling").GetProperty("seed").GetUInt64(), root.GetProperty("resolved").GetProperty("sampling").GetProperty("seed").GetUInt64());
        Assert.Equal(2, root.GetProperty("results").GetArrayLength());
        foreach (var r in root.GetProperty("results").EnumerateArray())
        {
            AssertKeys(r, "temperature", "minimum", "mean", "meanShift", "meanShiftStdErr", "variance", "varianceStdErr", "rms", "rmsStdErr",
                "skewness", "excessKurtosis", "harmonic", "firstOrder", "exact", "diagnostics", "warnings");
            AssertKeys(r.GetProperty("harmonic"), "variance");
            AssertKeys(r.GetProperty("firstOrder"), "meanShift", "variance");
            AssertKeys(r.GetProperty("exact"), "mean", "variance", "skewness", "excessKurtosis", "probabilityNearWalls", "zScoreMean", "zScoreVariance", "cumulants");
            AssertKeys(r.GetProperty("exact").GetProperty("cumulants"), "third", "fourth");
            // The sampled cumulants beside them (5 000 draws per chain make 2 groups of 4096 and the rest: too few for error bars, which are then absent).
            AssertKeys(r.GetProperty("cumulants"), "third", "fourth");
            Assert.False(r.GetProperty("cumulants").TryGetProperty("thirdStdErr", out _), "an error bar from too few groups must be absent, not invented");
            // The distribution: N + 1 edges, the sampled density with its errors, the exact and harmonic bin averages.
            var d = r.GetProperty("distribution");
            AssertKeys(d, "edges", "density", "densityStdErr", "exact", "harmonic");
            double[] Values(string key) => d.GetProperty(key).EnumerateArray().Select(e => e.GetDouble()).ToArray();
            var edges = Values("edges");
            var density = Values("density");
            var exactBins = Values("exact");
            Assert.Equal(density.Length + 1, edges.Length);
            Assert.Equal(density.Length, exactBins.Length);
            Assert.Equal(density.Length, Values("harmonic").Length);
            Assert.Equal(1.0, density.Select((p, i) => p * (edges[i + 1] - edges[i])).Sum(), 9); // every draw lies in the window
            Assert.Equal(1.0, exactBins.Select((p, i) => p * (edges[i + 1] - edges[i])).Sum(), 9); // the exact probabilities over the window
            var se = Values("densityStdErr");
            Assert.True(density.Select((p, i) => Math.Abs(p - exactBins[i]) > 4.5 * se[i] + 1e-9).Count(x => x) <= 1, "the sampled bins agree with the exact ones");
            AssertKeys(r.GetProperty("diagnostics"), "acceptanceRate", "autocorrelationTime", "effectiveSampleSize", "rHat", "draws");
            Assert.False(r.TryGetProperty("covariance", out _), "site keys must be absent for a line");
            Assert.False(r.TryGetProperty("temperatureFactor", out _), "no scattering vector was asked for");
            bool quantumWarning = r.GetProperty("warnings").EnumerateArray().Any(w => w.GetProperty("code").GetString() is "quantum-effects" or "de-broglie-wavelength");
            Assert.Equal(quantumWarning, r.TryGetProperty("quantumExact", out var quantum));
            if (quantumWarning)
            {
                AssertKeys(quantum, "mean", "variance", "rms", "skewness", "excessKurtosis", "varianceRatioToClassical", "boundLevels", "shareAboveEscape",
                    "gridPoints", "angularMomenta", "converged");
            }
            foreach (var w in r.GetProperty("warnings").EnumerateArray())
            {
                AssertKeys(w, "code", "message");
            }
            Assert.Equal(10000, r.GetProperty("diagnostics").GetProperty("draws").GetInt64());
            Assert.True(Math.Abs(r.GetProperty("exact").GetProperty("zScoreMean").GetDouble()) < 4);
        }
    }

    /// <summary>A sweep of three or more temperatures carries the Einstein fit of U(T); a single temperature does not.</summary>
    [Fact]
    public void A_sweep_carries_the_einstein_fit_of_its_curve()
    {
        string scenario = LineScenario.Replace("\"temperatures\": [10, 40]", "\"temperatures\": [10, 20, 40, 60]", StringComparison.Ordinal);
        Assert.NotEqual(LineScenario, scenario);
        var (code, stdout, stderr) = Run(scenario);
        Assert.True(code == 0, stderr);
        using var doc = JsonDocument.Parse(stdout);
        var fit = doc.RootElement.GetProperty("einsteinFit");
        AssertKeys(fit, "einsteinTemperature", "chiSquared", "degreesOfFreedom", "temperatures", "model");
        Assert.InRange(fit.GetProperty("einsteinTemperature").GetDouble(), 1, 10_000);
        Assert.Equal(4, fit.GetProperty("model").GetArrayLength());
        using var two = JsonDocument.Parse(Run(LineScenario).Stdout);
        Assert.False(two.RootElement.TryGetProperty("einsteinFit", out _), "two temperatures make no fit");
    }

    /// <summary>The tidy formats: one row per temperature and quantity, the same numbers as the JSON document.</summary>
    [Fact]
    public async System.Threading.Tasks.Task Tidy_formats_give_one_row_per_temperature_and_quantity()
    {
        var (code, csv, stderr) = Run(SiteScenario, "--format", "tidy-csv");
        Assert.True(code == 0, stderr);
        var lines = csv.Split('\n', StringSplitOptions.RemoveEmptyEntries);
        Assert.Equal("scenario,temperature,quantity,component,method,value,stdErr,unit", lines[0]);
        Assert.Contains(lines, l => l.Contains(",meanSquareDisplacement,,metropolis,", StringComparison.Ordinal));
        Assert.Contains(lines, l => l.Contains(",meanSquareDisplacement,,harmonic,", StringComparison.Ordinal));
        Assert.Contains(lines, l => l.Contains(",fourthCumulant,3333,", StringComparison.Ordinal));
        var (_, jsonLines, _) = Run(SiteScenario, "--format", "json-lines");
        var rows = jsonLines.Split('\n', StringSplitOptions.RemoveEmptyEntries).Select(l => JsonDocument.Parse(l).RootElement).ToList();
        Assert.Equal(lines.Length - 1, rows.Count);
        var (_, json, _) = Run(SiteScenario);
        using var doc = JsonDocument.Parse(json);
        double msd = doc.RootElement.GetProperty("results")[0].GetProperty("meanSquareDisplacement").GetDouble();
        var row = rows.First(r => r.GetProperty("quantity").GetString() == "meanSquareDisplacement");
        Assert.Equal(msd, row.GetProperty("value").GetDouble());
        // Parquet (read back with Parquet.Net): the same rows, typed, with null where no error is estimated.
        string parquet = Path.Combine(Path.GetTempPath(), $"ts-{Guid.NewGuid():N}.parquet");
        try
        {
            var (parquetCode, _, parquetErr) = Run(SiteScenario, "--format", "parquet", "--output", parquet);
            Assert.True(parquetCode == 0, parquetErr);
            using var file = File.OpenRead(parquet);
            var read = (await Parquet.Serialization.ParquetSerializer.DeserializeAsync<TidyWriter.ParquetRow>(file)).Data;
            Assert.Equal(rows.Count, read.Count);
            for (int i = 0; i < rows.Count; i++)
            {
                Assert.Equal(rows[i].GetProperty("quantity").GetString(), read[i].Quantity);
                Assert.Equal(rows[i].GetProperty("method").GetString(), read[i].Method);
                Assert.Equal(rows[i].GetProperty("value").GetDouble(), read[i].Value);
                Assert.Equal(rows[i].GetProperty("stdErr").ValueKind == JsonValueKind.Null ? null : (double?)rows[i].GetProperty("stdErr").GetDouble(), read[i].StdErr);
                Assert.Equal(rows[i].GetProperty("scenario").GetString(), read[i].Scenario);
            }
        }
        finally
        {
            File.Delete(parquet);
        }
    }

    [Fact]
    public void Output_bins_sets_the_distribution_bins()
    {
        string scenario = LineScenario.Replace("\"sampling\"", "\"output\": { \"bins\": 12 }, \"sampling\"", StringComparison.Ordinal);
        Assert.NotEqual(LineScenario, scenario);
        var (code, stdout, stderr) = Run(scenario);
        Assert.True(code == 0, stderr);
        using var doc = JsonDocument.Parse(stdout);
        var r = doc.RootElement.GetProperty("results")[0];
        Assert.Equal(12, r.GetProperty("distribution").GetProperty("density").GetArrayLength());
        Assert.Equal(12, doc.RootElement.GetProperty("resolved").GetProperty("sampling").GetProperty("histogramBins").GetInt32());
    }

    /// <summary>
    /// output.scatteringVectors: per q (in inverse scenario length units, echoed as typed) the sampled T(q) with errors, the
    /// exact and harmonic values for a pair, the Gaussian and the departure from it; a site takes [qx, qy, qz] and its T at
    /// a q in nm⁻¹ equals the one at the same q in Å⁻¹ scaled (the units convert, not the physics); misuse names the JSON path.
    /// </summary>
    [Fact]
    public void Scattering_vectors_give_the_temperature_factor_in_the_scenario_units()
    {
        string line = LineScenario.Replace("\"sampling\"", "\"output\": { \"scatteringVectors\": [1.5, 6] }, \"sampling\"", StringComparison.Ordinal)
            .Replace("\"samplesPerChain\": 5000", "\"samplesPerChain\": 20000", StringComparison.Ordinal); // 10 groups: enough for error bars
        var (code, stdout, stderr) = Run(line);
        Assert.True(code == 0, stderr);
        using (var doc = JsonDocument.Parse(stdout))
        {
            var points = doc.RootElement.GetProperty("results")[1].GetProperty("temperatureFactor");
            Assert.Equal(2, points.GetArrayLength());
            Assert.Equal(1.5, points[0].GetProperty("q").GetDouble());
            foreach (var p in points.EnumerateArray())
            {
                AssertKeys(p, "q", "value", "imaginary", "stdErr", "imaginaryStdErr", "exact", "exactImaginary", "harmonic", "ratio", "ratioStdErr",
                    "gaussian", "departureFromGaussian", "departureFromGaussianStdErr", "gaussianFails");
                Assert.InRange(p.GetProperty("value").GetDouble(), -1, 1);
            }
        }
        string site = SiteScenario.Replace("\"sampling\"", "\"output\": { \"scatteringVectors\": [[30, 0, 0], [10, 20, 30]] }, \"sampling\"", StringComparison.Ordinal);
        (code, stdout, stderr) = Run(site);
        Assert.True(code == 0, stderr);
        using (var doc = JsonDocument.Parse(stdout))
        {
            var p = doc.RootElement.GetProperty("results")[0].GetProperty("temperatureFactor")[1];
            Assert.Equal([10.0, 20.0, 30.0], p.GetProperty("q").EnumerateArray().Select(e => e.GetDouble()).ToArray());
            Assert.False(p.TryGetProperty("exact", out _), "a site has no exact T(q): absent, not invented");
            // The harmonic factor exp(−½ qᵀUq) (U in nm², q in 1/nm: dimensionless).
            Assert.InRange(p.GetProperty("harmonic").GetDouble(), 0.5, 1);
        }
        // sin θ/λ along a direction: |q| = 4π sin θ/λ (here 0.5/nm along [0, 0, 2], so q = [0, 0, 2π]).
        string bySinTheta = SiteScenario.Replace("\"sampling\"", "\"output\": { \"scatteringVectors\": [{ \"sinThetaOverLambda\": 0.5, \"direction\": [0, 0, 2] }] }, \"sampling\"", StringComparison.Ordinal);
        (code, stdout, stderr) = Run(bySinTheta);
        Assert.True(code == 0, stderr);
        using (var doc = JsonDocument.Parse(stdout))
        {
            var q = doc.RootElement.GetProperty("results")[0].GetProperty("temperatureFactor")[0].GetProperty("q").EnumerateArray().Select(e => e.GetDouble()).ToArray();
            Assert.Equal(0, q[0]);
            Assert.Equal(2 * Math.PI, q[2], 12);
        }
        string bad = SiteScenario.Replace("\"sampling\"", "\"output\": { \"scatteringVectors\": [3, [1, 2, 300000]] }, \"sampling\"", StringComparison.Ordinal);
        (code, _, stderr) = Run(bad);
        Assert.Equal(2, code);
        Assert.Contains("$.output.scatteringVectors[0]: a site takes [qx, qy, qz] per scattering vector, not the number 3.", stderr);
        Assert.Contains("$.output.scatteringVectors[1][2]: 300000 is out of range", stderr);
    }

    /// <summary>output.symmetrise adds the tensors averaged over the point group, with the group named; it is refused for a pair by its JSON path.</summary>
    [Fact]
    public void Symmetrise_adds_the_averaged_tensors_and_names_the_group()
    {
        string site = SiteScenario.Replace("\"sampling\"", "\"output\": { \"symmetrise\": true }, \"sampling\"", StringComparison.Ordinal);
        var (code, stdout, stderr) = Run(site);
        Assert.True(code == 0, stderr);
        using var doc = JsonDocument.Parse(stdout);
        var sym = doc.RootElement.GetProperty("results")[0].GetProperty("symmetrised");
        AssertKeys(sym, "pointGroup", "operations", "covariance", "third", "thirdStdErr", "fourth", "fourthStdErr");
        Assert.Equal("Oh", sym.GetProperty("pointGroup").GetString());
        Assert.Equal(48, sym.GetProperty("operations").GetInt32());
        Assert.All(sym.GetProperty("third").EnumerateArray(), k => Assert.Equal(0, k.GetDouble(), 1e-20));
        string pair = LineScenario.Replace("\"sampling\"", "\"output\": { \"symmetrise\": true }, \"sampling\"", StringComparison.Ordinal);
        (code, _, stderr) = Run(pair);
        Assert.Equal(2, code);
        Assert.Contains("$.output.symmetrise: applies to sites only", stderr);
    }

    /// <summary>--format distribution-csv: one row per temperature, part and bin, the same numbers as the JSON distribution.</summary>
    [Fact]
    public void Distribution_csv_has_a_row_per_bin_with_the_json_numbers()
    {
        var (code, csv, stderr) = Run(SiteScenario, "--format", "distribution-csv");
        Assert.True(code == 0, stderr);
        var lines = csv.Split('\n', StringSplitOptions.RemoveEmptyEntries);
        Assert.Equal("temperature,part,lower,upper,secondLower,secondUpper,density,densityStdErr,exact,harmonic,unit", lines[0]);
        var rows = lines.Skip(1).Select(l => l.Split(',')).ToList();
        Assert.Equal(60, rows.Count(r => r[1] == "axis2"));
        Assert.Equal(32 * 32, rows.Count(r => r[1] == "projection"));
        Assert.All(rows.Where(r => r[1] == "projection"), r => Assert.Equal("1/nm^2", r[10]));
        using var doc = JsonDocument.Parse(Run(SiteScenario).Stdout);
        var radial = doc.RootElement.GetProperty("results")[0].GetProperty("distribution").GetProperty("radial").GetProperty("density");
        Assert.Equal(radial[7].GetDouble(), double.Parse(rows.Where(r => r[1] == "radial").ElementAt(7)[6], System.Globalization.CultureInfo.InvariantCulture));
        var (_, pairCsv, _) = Run(LineScenario, "--format", "distribution-csv");
        var pairRow = pairCsv.Split('\n', StringSplitOptions.RemoveEmptyEntries)[1].Split(',');
        Assert.Equal("separation", pairRow[1]);
        Assert.NotEqual("", pairRow[8]); // the exact bin average beside
    }

    /// <summary>
    /// A sweep split into parts (sweep --shard I/N --output FILE) and merged gives exactly the one-process sweep document,
    /// whatever the order the parts are given in, for a line pair and a site; a sweep without --from/--to/--count runs the
    /// scenario's own temperatures (the run document); merge refuses a part given twice, missing parts (listing them) and
    /// a part of another sweep, naming the files.
    /// </summary>
    [Theory]
    [InlineData("line", 3)]
    [InlineData("site", 4)]
    public void Sharded_sweeps_merge_to_the_one_process_document(string which, int shards)
    {
        string scenario = which == "line" ? LineScenario : SiteScenario.Replace("\"temperatures\": [300]", "\"temperatures\": [200, 300]", StringComparison.Ordinal);
        string file = Path.Combine(Path.GetTempPath(), $"ts-{Guid.NewGuid():N}.json");
        File.WriteAllText(file, scenario);
        var partFiles = Enumerable.Range(1, shards).Select(i => Path.Combine(Path.GetTempPath(), $"ts-part-{Guid.NewGuid():N}-{i}.json")).ToArray();
        try
        {
            var (code, whole, stderr) = RunArgs("sweep", file, "--format", "json", "--quiet");
            Assert.True(code == 0, stderr);
            Assert.Equal(RunArgs("run", file, "--format", "json", "--quiet").Stdout, whole);
            for (int i = 0; i < shards; i++)
            {
                (code, _, stderr) = RunArgs("sweep", file, "--shard", $"{i + 1}/{shards}", "--output", partFiles[i], "--quiet");
                Assert.True(code == 0, stderr);
            }
            var (mergeCode, merged, mergeErr) = RunArgs(["merge", .. partFiles.Reverse()]);
            Assert.True(mergeCode == 0, mergeErr);
            Assert.Equal(whole, merged);

            (code, _, stderr) = RunArgs("merge", partFiles[0], partFiles[0], partFiles[1]);
            Assert.Equal(2, code);
            Assert.Contains($"part 1 of {shards} is given twice", stderr);
            (code, _, stderr) = RunArgs("merge", partFiles[0]);
            Assert.Contains($"{shards - 1} of {shards} parts are missing: 2", stderr);
            string other = Path.Combine(Path.GetTempPath(), $"ts-part-{Guid.NewGuid():N}.json");
            RunArgs("sweep", file, "--shard", $"2/{shards}", "--seed", "99", "--output", other, "--quiet");
            (code, _, stderr) = RunArgs("merge", partFiles[0], other);
            Assert.Contains("are parts of different sweeps: seed 99 against", stderr);
            File.Delete(other);
        }
        finally
        {
            File.Delete(file);
            foreach (var f in partFiles)
            {
                File.Delete(f);
            }
        }
    }

    [Fact]
    public void Shard_options_are_checked()
    {
        Assert.Contains("--shard needs --output FILE", RunArgs("sweep", "x.json", "--shard", "1/2").Stderr);
        Assert.Contains("--shard '0/2' is not a part of a sweep", RunArgs("sweep", "x.json", "--shard", "0/2", "--output", "p.json").Stderr);
        Assert.Contains("--from, --to and --count together", RunArgs("sweep", "x.json", "--from", "10").Stderr);
        Assert.Contains("--plot does not go with --shard", RunArgs("sweep", "x.json", "--shard", "1/2", "--output", "p.json", "--plot", "f.png").Stderr);
    }

    /// <summary>
    /// A site from a structure given as XYZ text: an invented fcc cell (extended XYZ with a Lattice) and atom 1 with a cutoff
    /// of 3.6 Å is the fcc cage, so the run gives the built-in cage's numbers (same MSD, point group Oh); an atom number
    /// beyond the file, a cutoff that holds nobody and neighbours of two species are refused by their JSON path.
    /// </summary>
    [Fact]
    public void A_structure_given_as_xyz_builds_its_site()
    {
        double a = Math.Sqrt(2) * 3.5;
        string cell = string.Create(System.Globalization.CultureInfo.InvariantCulture,
            $"4\\nLattice=\\\"{a} 0 0 0 {a} 0 0 0 {a}\\\"\\nAr 0 0 0\\nAr {a / 2} {a / 2} 0\\nAr {a / 2} 0 {a / 2}\\nAr 0 {a / 2} {a / 2}\\n");
        string Scenario(string landscape) => $$"""
            { "mass": 40, "potential": { "form": "lennard-jones", "wellDepth": 0.010, "equilibriumDistance": 3.5 },
              "landscape": {{landscape}}, "temperatures": [60], "sampling": { "chains": 2, "samplesPerChain": 4000, "burnIn": 1000, "seed": 3 } }
            """;
        string confinement = "\"confinement\": { \"shape\": \"sphere\", \"radius\": 1.2 }";
        var (code, fromFile, stderr) = Run(Scenario($"{{ \"kind\": \"structure\", \"xyz\": \"{cell}\", \"atom\": 1, \"cutoff\": 3.6, {confinement} }}"));
        Assert.True(code == 0, stderr);
        var (_, builtIn, _) = Run(Scenario($"{{ \"kind\": \"sites\", \"lattice\": \"fcc\", \"nearestNeighbourDistance\": 3.5, {confinement} }}"));
        double Msd(string json) => JsonDocument.Parse(json).RootElement.GetProperty("results")[0].GetProperty("meanSquareDisplacement").GetDouble();
        Assert.Equal(Msd(builtIn), Msd(fromFile), 12);
        Assert.Contains("$.landscape.atom: 9 is beyond the structure's 4 atoms", Run(Scenario($"{{ \"kind\": \"structure\", \"xyz\": \"{cell}\", \"atom\": 9, \"cutoff\": 3.6, {confinement} }}")).Stderr);
        Assert.Contains("$.landscape.cutoff: no atom lies within 1", Run(Scenario($"{{ \"kind\": \"structure\", \"xyz\": \"{cell}\", \"atom\": 1, \"cutoff\": 1, {confinement} }}")).Stderr);
        string mixed = cell.Replace("\\nAr 0 0 0", "\\nKr 0 0 0", StringComparison.Ordinal);
        Assert.Contains("$.landscape.species: the neighbours are of 2 species", Run(Scenario($"{{ \"kind\": \"structure\", \"xyz\": \"{mixed}\", \"atom\": 2, \"cutoff\": 3.6, {confinement} }}")).Stderr);
        Assert.Contains("$.landscape.xyz: $.landscape.xyz, line 3:", Run(Scenario($"{{ \"kind\": \"structure\", \"xyz\": \"1\\ncomment\\nAr 0 0\", \"atom\": 1, \"cutoff\": 3.6, {confinement} }}")).Stderr);
        // The same crystal as CIF text (one site, the four centring operations), the atom chosen by its label.
        string cif = "data_x\\n_cell_length_a 4.949747468305833\\n_cell_length_b 4.949747468305833\\n_cell_length_c 4.949747468305833\\n"
            + "_cell_angle_alpha 90\\n_cell_angle_beta 90\\n_cell_angle_gamma 90\\nloop_\\n_symmetry_equiv_pos_as_xyz\\n'x,y,z'\\n'x,y+1/2,z+1/2'\\n'x+1/2,y,z+1/2'\\n'x+1/2,y+1/2,z'\\n"
            + "loop_\\n_atom_site_label\\n_atom_site_type_symbol\\n_atom_site_fract_x\\n_atom_site_fract_y\\n_atom_site_fract_z\\nAr1 Ar 0 0 0\\n";
        var (cifCode, fromCif, cifErr) = Run(Scenario($"{{ \"kind\": \"structure\", \"cif\": \"{cif}\", \"atomLabel\": \"Ar\", \"cutoff\": 3.6, {confinement} }}"));
        Assert.True(cifCode == 0, cifErr);
        Assert.Equal(Msd(builtIn), Msd(fromCif), 10);
        Assert.Contains("give exactly one of xyz (XYZ text) or cif (CIF text)", Run(Scenario($"{{ \"kind\": \"structure\", \"atom\": 1, \"cutoff\": 3.6, {confinement} }}")).Stderr);
    }

    [Fact]
    public void Site_run_writes_site_keys_in_the_scenario_units()
    {
        var (code, stdout, stderr) = Run(SiteScenario);
        Assert.True(code == 0, stderr);
        using var doc = JsonDocument.Parse(stdout);
        var r = doc.RootElement.GetProperty("results")[0];
        AssertKeys(r, "temperature", "minimum", "mean", "meanShift", "meanShiftStdErr", "covariance", "meanSquareDisplacement",
            "meanSquareDisplacementStdErr", "debyeWallerB", "harmonic", "firstOrder", "diagnostics", "warnings");
        AssertKeys(r.GetProperty("harmonic"), "meanSquareDisplacement");
        Assert.Equal(3, r.GetProperty("mean").GetArrayLength());
        Assert.Equal(3, r.GetProperty("covariance").GetArrayLength());
        Assert.False(r.TryGetProperty("exact", out _), "there is no exact reference for sites");
        AssertKeys(r.GetProperty("cumulants"), "third", "thirdStdErr", "fourth", "fourthStdErr");
        AssertKeys(r.GetProperty("gramCharlier"), "third", "fourth");
        AssertKeys(r.GetProperty("symmetry"), "pointGroup", "operations", "covariance", "third", "fourth");
        Assert.Equal("Oh", r.GetProperty("symmetry").GetProperty("pointGroup").GetString());
        Assert.False(r.TryGetProperty("symmetrised", out _), "symmetrised tensors only on request");
        AssertKeys(r.GetProperty("firstOrder"), "meanShift", "covariance", "cumulants");
        // The distribution: axes, three marginals, the radial density and the projection, each integrating with the
        // share beyond its range to 1 (lengths in nm, densities per nm and per nm²).
        var d = r.GetProperty("distribution");
        AssertKeys(d, "centre", "principalAxes", "marginals", "radial", "projection");
        Assert.Equal(3, d.GetProperty("principalAxes").GetArrayLength());
        Assert.Equal(3, d.GetProperty("marginals").GetArrayLength());
        static double[] Values(JsonElement e, string key) => e.GetProperty(key).EnumerateArray().Select(x => x.GetDouble()).ToArray();
        foreach (var part in d.GetProperty("marginals").EnumerateArray().Append(d.GetProperty("radial")))
        {
            AssertKeys(part, "edges", "density", "densityStdErr", "shareOutside");
            var edges = Values(part, "edges");
            var density = Values(part, "density");
            Assert.Equal(density.Length + 1, edges.Length);
            Assert.Equal(1.0, density.Select((p, i) => p * (edges[i + 1] - edges[i])).Sum() + part.GetProperty("shareOutside").GetDouble(), 9);
        }
        var projection = d.GetProperty("projection");
        AssertKeys(projection, "firstEdges", "secondEdges", "density", "densityStdErr", "shareOutside");
        var first = Values(projection, "firstEdges");
        var second = Values(projection, "secondEdges");
        double cell = (first[1] - first[0]) * (second[1] - second[0]);
        double mass = projection.GetProperty("density").EnumerateArray().Sum(row => row.EnumerateArray().Sum(x => x.GetDouble())) * cell;
        Assert.Equal(1.0, mass + projection.GetProperty("shareOutside").GetDouble(), 9);
        Assert.Equal(first.Length - 1, projection.GetProperty("density").GetArrayLength());
        Assert.InRange(first[^1], 0.001, 0.1); // nm: ±6 harmonic σ of a Cu-like cage
        Assert.Equal(15, r.GetProperty("firstOrder").GetProperty("cumulants").GetProperty("fourth").GetArrayLength());
        Assert.Equal(10, r.GetProperty("cumulants").GetProperty("third").GetArrayLength());
        Assert.Equal(15, r.GetProperty("cumulants").GetProperty("fourthStdErr").GetArrayLength());
        Assert.Equal(r.GetProperty("cumulants").GetProperty("fourth")[0].GetRawText(), r.GetProperty("gramCharlier").GetProperty("fourth")[0].GetRawText());
        // nm²: an MSD of order 1e-4 nm² (= 1e-2 Å²) for a Cu-like cage at 300 K; B = 8π² MSD/3 in the same unit.
        double msd = r.GetProperty("meanSquareDisplacement").GetDouble();
        Assert.InRange(msd, 1e-5, 1e-3);
        Assert.Equal(8 * Math.PI * Math.PI * msd / 3, r.GetProperty("debyeWallerB").GetDouble(), 12);
    }

    [Fact]
    public void Same_seed_gives_the_same_document_and_seed_override_changes_it()
    {
        var a = Run(LineScenario, "--threads", "1");
        var b = Run(LineScenario, "--threads", "2");
        var c = Run(LineScenario, "--seed", "8");
        Assert.Equal(a.Stdout, b.Stdout);
        Assert.NotEqual(a.Stdout, c.Stdout);
    }

    [Theory]
    [InlineData("\"mass\": 39.9,", "\"mass\": 39.9, \"colour\": \"red\",", "$.colour")]
    [InlineData("\"mass\": 39.9,", "", "$.mass")]
    [InlineData("\"mass\": 39.9,", "\"mass\": -3,", "$.mass")]
    [InlineData("\"energy\": \"eV\"", "\"energy\": \"erg\"", "$.units.energy")]
    [InlineData("\"window\": [3.0, 6.0]", "\"window\": [6.0, 3.0]", "$.landscape.window")]
    [InlineData("\"window\": [3.0, 6.0]", "\"window\": [3.0]", "$.landscape.window")]
    [InlineData("\"kind\": \"line\"", "\"kind\": \"plane\"", "$.landscape.kind")]
    [InlineData("\"form\": \"lennard-jones\"", "\"form\": \"yukawa\"", "$.potential.form")]
    [InlineData("\"wellDepth\": 0.0120", "\"wellDepth\": \"deep\"", "$.potential.wellDepth")]
    [InlineData("\"temperatures\": [10, 40]", "\"temperatures\": [10, 10]", "$.temperatures")]
    [InlineData("\"temperatures\": [10, 40]", "\"temperatures\": [10, -4]", "$.temperatures[1]")]
    [InlineData("\"seed\": 7", "\"seed\": 7.5", "$.sampling.seed")]
    [InlineData("\"chains\": 2", "\"chains\": 0", "$.sampling.chains")]
    [InlineData("\"method\": \"metropolis\"", "\"method\": \"gibbs\"", "$.sampling.method")]
    public void Invalid_scenarios_exit_with_2_and_name_the_json_path(string from, string to, string path)
    {
        var (code, stdout, stderr) = Run(LineScenario.Replace(from, to, StringComparison.Ordinal));
        Assert.Equal(Program.InvalidInput, code);
        Assert.Contains(path, stderr);
        Assert.Empty(stdout);
        Assert.DoesNotContain("   at ", stderr); // no stack trace
    }

    [Fact]
    public void All_problems_are_reported_at_once()
    {
        string bad = LineScenario.Replace("\"mass\": 39.9,", "\"mass\": 0,").Replace("\"chains\": 2", "\"chains\": 0").Replace("\"energy\": \"eV\"", "\"energy\": \"erg\"");
        var (code, _, stderr) = Run(bad);
        Assert.Equal(2, code);
        Assert.Contains("$.mass", stderr);
        Assert.Contains("$.sampling.chains", stderr);
        Assert.Contains("$.units.energy", stderr);
    }

    [Fact]
    public void Window_inside_the_Buckingham_barrier_is_an_invalid_scenario()
    {
        string s = LineScenario.Replace("\"form\": \"lennard-jones\", \"wellDepth\": 0.0120, \"equilibriumDistance\": 3.50", "\"form\": \"buckingham\", \"A\": 22764.0, \"rho\": 0.149, \"C\": 27.88")
            .Replace("\"window\": [3.0, 6.0]", "\"window\": [0.5, 2.0]");
        var (code, _, stderr) = Run(s);
        Assert.Equal(2, code);
        Assert.Contains("$.landscape.window", stderr);
        Assert.Contains("barrier", stderr);
    }

    [Fact]
    public void Malformed_json_reports_line_and_column()
    {
        var (code, _, stderr) = Run("{\n  \"title\": \"x\",\n  \"mass\": ,\n}");
        Assert.Equal(2, code);
        Assert.Contains("line 3", stderr);
        Assert.Contains("column", stderr);
    }

    [Fact]
    public void Missing_file_unknown_command_and_bad_options_exit_with_2()
    {
        Assert.Equal(2, RunArgs("run", "/nonexistent/scenario.json").Code);
        Assert.Equal(2, RunArgs("frobnicate").Code);
        Assert.Equal(2, RunArgs("run").Code);
        Assert.Equal(2, Run(LineScenario, "--format", "yaml").Code);
        Assert.Equal(2, Run(LineScenario, "--threads", "zero").Code);
        Assert.Equal(0, RunArgs("--version").Code);
    }

    [Fact]
    public void Output_file_gets_the_same_document_as_stdout()
    {
        string output = Path.Combine(Path.GetTempPath(), $"ts-out-{Guid.NewGuid():N}.json");
        try
        {
            var toFile = Run(LineScenario, "--output", output);
            Assert.Equal(0, toFile.Code);
            Assert.Equal(Run(LineScenario).Stdout, File.ReadAllText(output));
        }
        finally
        {
            File.Delete(output);
        }
    }

    [Fact]
    public void The_built_tool_runs_as_a_real_process()
    {
        string dll = typeof(Program).Assembly.Location;
        string file = Path.Combine(Path.GetTempPath(), $"ts-{Guid.NewGuid():N}.json");
        File.WriteAllText(file, LineScenario);
        try
        {
            var psi = new ProcessStartInfo("dotnet") { RedirectStandardOutput = true, RedirectStandardError = true, UseShellExecute = false };
            psi.ArgumentList.Add(dll);
            psi.ArgumentList.Add("run");
            psi.ArgumentList.Add(file);
            using var process = Process.Start(psi)!;
            string stdout = process.StandardOutput.ReadToEnd();
            string stderr = process.StandardError.ReadToEnd();
            Assert.True(process.WaitForExit(120_000), "the tool did not finish in 2 minutes");
            Assert.True(process.ExitCode == 0, stderr);
            using var doc = JsonDocument.Parse(stdout);
            Assert.Equal(2, doc.RootElement.GetProperty("results").GetArrayLength());
        }
        finally
        {
            File.Delete(file);
        }
    }
}

/// <summary>The human-facing commands and formats.</summary>
public class CliCommandTests
{
    private const string Scenario = """
        {
          "title": "invented test pair",
          "mass": 39.9,
          "potential": { "form": "morse", "wellDepth": 0.4, "width": 1.5, "equilibriumDistance": 2.8 },
          "landscape": { "kind": "radial", "window": [2.2, 4.0] },
          "temperatures": [100, 300],
          "sampling": { "chains": 2, "samplesPerChain": 5000, "burnIn": 1000, "seed": 1 }
        }
        """;

    [Fact]
    public void Table_format_has_units_in_headers_and_errors_beside_values()
    {
        string file = WriteScenario(Scenario);
        var (code, stdout, stderr) = RunArgs("run", file, "--format", "table", "--quiet");
        Assert.True(code == 0, stderr);
        Assert.Contains("mean (Å)", stdout);
        Assert.Contains("RMS harmonic (Å)", stdout);
        Assert.Contains(" ± ", stdout);
        Assert.Contains("invented test pair", stdout);
        Assert.Empty(stderr); // --quiet: no progress
    }

    [Fact]
    public void Markdown_and_csv_formats_carry_the_same_rows()
    {
        string file = WriteScenario(Scenario);
        var md = RunArgs("run", file, "--format", "markdown", "--quiet");
        var csv = RunArgs("run", file, "--format", "csv", "--quiet");
        Assert.Equal(0, md.Code);
        Assert.Equal(0, csv.Code);
        Assert.StartsWith("### invented test pair", md.Stdout);
        Assert.Contains("| T (K) |", md.Stdout);
        var lines = csv.Stdout.Split('\n', StringSplitOptions.RemoveEmptyEntries);
        Assert.Equal(3, lines.Length); // header + two temperatures
        Assert.StartsWith("T (K),mean (Å),mean (Å) stderr", lines[0]);
        Assert.StartsWith("100,", lines[1]);
        Assert.Equal(lines[0].Split(',').Length, lines[1].Split(',').Length);
    }

    [Fact]
    public void Redirected_progress_is_printed_line_by_line_to_stderr()
    {
        string file = WriteScenario(Scenario);
        var (code, stdout, stderr) = RunArgs("run", file);
        Assert.Equal(0, code);
        Assert.Contains("progress: T = 100 K: 100%", stderr);
        Assert.Contains("progress: T = 300 K: ", stderr);
        // The first line of a temperature comes as soon as 1 % is done (here the first report, a 4096-step chunk, is further on)
        // and gives the time left for the whole run, both temperatures.
        Assert.Matches(@"progress: T = 100 K: \d+%, about \d+ s left for the whole run", stderr);
        using var doc = JsonDocument.Parse(stdout); // progress never pollutes the report
    }

    [Fact]
    public void Validate_checks_without_running()
    {
        string good = WriteScenario(Scenario);
        var ok = RunArgs("validate", good);
        Assert.Equal(0, ok.Code);
        Assert.Contains("valid scenario", ok.Stderr);
        Assert.Empty(ok.Stdout);
        string bad = WriteScenario(Scenario.Replace("\"radial\"", "\"spiral\"").Replace("\"mass\": 39.9", "\"mass\": -1"));
        var ko = RunArgs("validate", bad);
        Assert.Equal(2, ko.Code);
        Assert.Contains("$.landscape.kind", ko.Stderr);
        Assert.Contains("$.mass", ko.Stderr);
    }

    [Fact]
    public void Sweep_replaces_the_temperatures_with_an_even_range()
    {
        string file = WriteScenario(Scenario);
        var (code, stdout, stderr) = RunArgs("sweep", file, "--from", "50", "--to", "250", "--count", "5", "--quiet");
        Assert.True(code == 0, stderr);
        using var doc = JsonDocument.Parse(stdout);
        var temperatures = doc.RootElement.GetProperty("results").EnumerateArray().Select(r => r.GetProperty("temperature").GetDouble()).ToArray();
        Assert.Equal(new[] { 50.0, 100, 150, 200, 250 }, temperatures);
        Assert.Equal(2, RunArgs("sweep", file, "--from", "50").Code);
        Assert.Equal(2, RunArgs("sweep", file, "--from", "300", "--to", "100", "--count", "3").Code);
        Assert.Equal(2, RunArgs("run", file, "--count", "3").Code);
        Assert.Contains("--steps is now --count", RunArgs("sweep", file, "--from", "50", "--to", "250", "--steps", "5").Stderr);
    }

    [Fact]
    public void Samples_option_writes_the_raw_draws_as_csv()
    {
        string file = WriteScenario(Scenario);
        string samples = Path.Combine(Path.GetTempPath(), $"ts-samples-{Guid.NewGuid():N}.csv");
        try
        {
            var (code, _, stderr) = RunArgs("run", file, "--samples", samples, "--quiet");
            Assert.True(code == 0, stderr);
            var lines = File.ReadAllLines(samples);
            Assert.Equal("temperature_K,chain,index,r_angstrom", lines[0]);
            Assert.Equal(1 + 2 * 2 * 5000, lines.Length); // 2 temperatures × 2 chains × 5000 draws
            double r = double.Parse(lines[1].Split(',')[3], System.Globalization.CultureInfo.InvariantCulture);
            Assert.InRange(r, 2.2, 4.0);
        }
        finally
        {
            File.Delete(samples);
        }
    }

    [Fact]
    public void Cancelled_run_exits_1_and_says_how_much_finished()
    {
        string file = WriteScenario(Scenario);
        using var cts = new System.Threading.CancellationTokenSource();
        cts.Cancel();
        using var stdout = new MemoryStream();
        using var stderr = new StringWriter();
        int code = Program.Run(new[] { "run", file, "--quiet" }, stdout, stderr, cts.Token);
        Assert.Equal(Program.Failure, code);
        Assert.Contains("cancelled: 0 of 2 temperature(s) finished", stderr.ToString());
        using var doc = JsonDocument.Parse(Encoding.UTF8.GetString(stdout.ToArray()));
        Assert.Equal(0, doc.RootElement.GetProperty("results").GetArrayLength());
    }

    [Fact]
    public void Demo_runs_both_invented_scenarios_and_prints_tables()
    {
        var (code, stdout, stderr) = RunArgs("demo", "--quiet");
        Assert.True(code == 0, stderr);
        Assert.Contains("Invented demo", stdout);
        Assert.Contains("fcc(111)", stdout);
        Assert.Contains("MSD (Å²)", stdout);
        Assert.Contains("shift (Å)", stdout);
        // Fits 120 columns (tables split, warnings word-wrapped), states its invented inputs, and groups the two quantum warnings.
        var lines = stdout.Split('\n').Select(l => l.TrimEnd('\r')).ToList();
        Assert.All(lines, l => Assert.True(l.Length <= 120, $"{l.Length} columns: {l}"));
        Assert.Contains(lines, l => l.StartsWith("Inputs: mass ", StringComparison.Ordinal) && l.Contains("ε = ", StringComparison.Ordinal));
        Assert.Contains(lines, l => l.StartsWith("warning [quantum-effects, de-broglie-wavelength] at 10 K:", StringComparison.Ordinal));
        Assert.DoesNotContain("E-2", stdout); // no exponent where a plain number fits (first-order shifts zero by symmetry print 0)
        // A clean row per scenario: the coldest temperature has no wall or escape warning in either.
        Assert.DoesNotContain(lines, l => System.Text.RegularExpressions.Regex.IsMatch(l, @"^warning \[(escape-risk|wall-mass|left-site)\] at 10(,| K)"));
        Assert.Equal(2, lines.Count(l => l.StartsWith("Invented demo", StringComparison.Ordinal)));
    }

    [Theory]
    [InlineData("0.###", 10.0, double.NaN, "10")]
    [InlineData("F0", 9783.5, double.NaN, "9784")]
    [InlineData("F2", -0.045004, double.NaN, "-0.05")]
    [InlineData("G4", 2.25e-22, double.NaN, "0")]
    [InlineData("G4", 2.3328e-5, double.NaN, "0.00002333")]
    [InlineData("G4", 3.5, 0.0123, "3.500 ± 0.012")]
    public void Table_cells_are_rounded_as_a_scientist_writes_them(string format, double value, double error, string expected)
        => Assert.Equal(expected, ReportTable.Format(new ReportCell(value, error), new ReportColumn("x", "", !double.IsNaN(error), format)));

    [Fact]
    public void Wrapped_warnings_never_pass_the_width_and_never_split_a_word_that_fits()
    {
        string text = string.Join(" ", Enumerable.Range(0, 60).Select(i => "word" + i));
        var lines = Renderers.Wrap(text, 40, "    ").ToList();
        Assert.All(lines, l => Assert.True(l.Length <= 40, l));
        Assert.Equal(text, string.Join(" ", lines.Select(l => l.Trim())));
        Assert.All(lines.Skip(1), l => Assert.StartsWith("    ", l));
    }

    [Fact]
    public void Surface_landscapes_are_accepted_in_scenarios()
    {
        string file = WriteScenario(Scenario.Replace("\"landscape\": { \"kind\": \"radial\", \"window\": [2.2, 4.0] }",
            "\"landscape\": { \"kind\": \"sites\", \"lattice\": \"fcc\", \"facet\": [1, 0, 0], \"adsorptionSite\": \"hollow\", \"nearestNeighbourDistance\": 2.55, \"confinement\": { \"shape\": \"box\", \"halfWidth\": 0.5 } }"));
        var (code, stdout, stderr) = RunArgs("run", file, "--quiet");
        Assert.True(code == 0, stderr);
        using var doc = JsonDocument.Parse(stdout);
        Assert.True(doc.RootElement.GetProperty("results")[0].GetProperty("meanSquareDisplacement").GetDouble() > 0);
        var surface = doc.RootElement.GetProperty("resolved").GetProperty("surface");
        Assert.StartsWith("hollow of fcc(100): 4-fold", surface.GetProperty("site").GetString());
        Assert.Contains("z along [1 0 0] (outward)", surface.GetProperty("frame").GetString());
    }

    [Theory]
    [InlineData("\"lattice\": \"fcc\", \"facet\": [1, 1, 1], \"adsorptionSite\": \"hollow\"", "$.landscape.adsorptionSite", "FccHollow")]
    [InlineData("\"lattice\": \"fcc\", \"facet\": [0, 0, 0], \"adsorptionSite\": \"top\"", "$.landscape.facet", "not a plane")]
    [InlineData("\"lattice\": \"fcc\", \"facet\": [1, 0.5, 0], \"adsorptionSite\": \"top\"", "$.landscape.facet", "integers")]
    [InlineData("\"lattice\": \"hcp\", \"facet\": [0, 0, 1], \"adsorptionSite\": \"top\"", "$.landscape.lattice", "fcc")]
    [InlineData("\"surface\": \"fcc111\", \"adsorptionSite\": \"hollow\"", "$.landscape", "surface")]
    [InlineData("\"lattice\": \"fcc\", \"adsorptionSite\": \"top\"", "$.landscape.adsorptionSite", "needs facet")]
    public void Surface_mistakes_are_named_by_their_json_path(string keys, string path, string hint)
    {
        string file = WriteScenario(Scenario.Replace("\"landscape\": { \"kind\": \"radial\", \"window\": [2.2, 4.0] }",
            "\"landscape\": { \"kind\": \"sites\", " + keys + ", \"nearestNeighbourDistance\": 2.55, \"confinement\": { \"shape\": \"box\", \"halfWidth\": 0.5 } }"));
        var (code, _, stderr) = RunArgs("run", file, "--quiet");
        Assert.Equal(2, code);
        Assert.Contains(path, stderr);
        Assert.Contains(hint, stderr);
    }

    [Fact]
    public void Validate_gives_the_warnings_run_gives_before_sampling()
    {
        // Invented: a window that excludes the minimum (3.5 Å) of an invented Lennard-Jones pair.
        string file = WriteScenario(Scenario.Replace("\"landscape\": { \"kind\": \"radial\", \"window\": [2.2, 4.0] }",
            "\"landscape\": { \"kind\": \"line\", \"window\": [3.8, 6.0] }")
            .Replace("\"potential\": { \"form\": \"morse\", \"wellDepth\": 0.4, \"width\": 1.5, \"equilibriumDistance\": 2.8 }",
                "\"potential\": { \"form\": \"lennard-jones\", \"wellDepth\": 0.015, \"equilibriumDistance\": 3.5 }"));
        var (validateCode, _, validateErr) = RunArgs("validate", file);
        Assert.Equal(0, validateCode);
        var (runCode, runOut, _) = RunArgs("run", file, "--quiet");
        Assert.Equal(0, runCode);
        using var doc = JsonDocument.Parse(runOut);
        var noSampling = new[] { "minimum-outside-window", "perturbation-invalid", "quantum-effects", "de-broglie-wavelength", "escape-risk", "wall-mass" };
        var runCodes = doc.RootElement.GetProperty("results").EnumerateArray()
            .SelectMany(r => r.GetProperty("warnings").EnumerateArray().Select(w => $"{r.GetProperty("temperature").GetDouble():G6} K [{w.GetProperty("code").GetString()}]"))
            .Where(c => noSampling.Any(n => c.EndsWith($"[{n}]", StringComparison.Ordinal)))
            .ToList();
        Assert.Contains(runCodes, c => c.EndsWith("[minimum-outside-window]", StringComparison.Ordinal));
        var validateCodes = validateErr.Split('\n').Where(l => l.StartsWith("warning at ", StringComparison.Ordinal))
            .Select(l => l["warning at ".Length..(l.IndexOf(']') + 1)]).ToList();
        Assert.Equal(runCodes, validateCodes);
    }

    [Fact]
    public void Validate_refuses_a_top_site_that_is_a_saddle_as_run_does()
    {
        // For pair potentials an adatom above a surface atom sits on a saddle (it slides towards the hollows).
        string file = WriteScenario(Scenario.Replace("\"landscape\": { \"kind\": \"radial\", \"window\": [2.2, 4.0] }",
            "\"landscape\": { \"kind\": \"sites\", \"lattice\": \"fcc\", \"facet\": [1, 1, 1], \"adsorptionSite\": \"top\", \"nearestNeighbourDistance\": 2.9, \"confinement\": { \"shape\": \"sphere\", \"radius\": 1.0 } }"));
        var (validateCode, _, validateErr) = RunArgs("validate", file);
        var (runCode, _, runErr) = RunArgs("run", file, "--quiet");
        Assert.Equal(2, validateCode);
        Assert.Equal(2, runCode);
        Assert.Contains("not a stable minimum", validateErr);
        Assert.Equal(runErr.Split('\n')[1], validateErr.Split('\n')[1]);
    }

    [Theory]
    [InlineData("run")]
    [InlineData("sweep")]
    [InlineData("resume")]
    [InlineData("validate")]
    [InlineData("demo")]
    public void Every_command_prints_its_help_on_standard_output_and_docs_cli_names_every_option(string command)
    {
        var (code, stdout, _) = RunArgs(command, "--help");
        Assert.Equal(0, code);
        Assert.Contains($"thermal-sampling {command}", stdout);
        string root = Repository.Root;
        var doc = File.ReadAllText(Path.Combine(root, "docs", "cli.md"));
        int start = doc.IndexOf($"thermal-sampling {command,-8} ", StringComparison.Ordinal);
        Assert.True(start >= 0, $"docs/cli.md has no synopsis line for {command}");
        int end = doc.IndexOf("\nthermal-sampling ", start + 1, StringComparison.Ordinal);
        string synopsis = doc[start..end];
        var options = System.Text.RegularExpressions.Regex.Matches(stdout, @"^\s+(--[a-z-]+)", System.Text.RegularExpressions.RegexOptions.Multiline)
            .Select(m => m.Groups[1].Value).Where(o => o != "--help").ToList();
        Assert.All(options, o => Assert.Matches(System.Text.RegularExpressions.Regex.Escape(o) + "(?![a-z-])", synopsis));
    }

    [Fact]
    public void The_tool_without_a_command_says_what_to_give_and_exits_2_and_help_exits_0()
    {
        Assert.Equal(2, RunArgs().Code);
        var (code, stdout, _) = RunArgs("--help");
        Assert.Equal(0, code);
        Assert.Contains("validate", stdout);
    }

    [Theory]
    [InlineData(40, "40 s")]
    [InlineData(720, "12 min")]
    [InlineData(12600, "3.5 h")]
    public void Durations_read_as_people_say_them(double seconds, string expected) => Assert.Equal(expected, Program.Duration(seconds));

    [Fact]
    public void A_run_planned_for_hours_is_estimated_in_hours()
    {
        // 2 temperatures × 2 chains × 10^12 steps of a pair at the rough 10 ns per step on one thread: 4·10^4 s, about 11 h.
        var scenario = ScenarioReader.Read(Encoding.UTF8.GetBytes(Scenario.Replace("\"samplesPerChain\": 5000", "\"samplesPerChain\": 1000000000000")));
        double hours = Program.EstimatedSeconds(scenario with { Sampling = scenario.Sampling with { MaxThreads = 1 } }) / 3600;
        Assert.InRange(hours, 11.0, 11.2);
        Assert.Equal("11.1 h", Program.Duration(hours * 3600));
    }

    [Fact]
    public void A_scenario_in_hartree_and_bohr_gives_the_numbers_of_the_same_scenario_in_eV_and_angstrom()
    {
        // The same invented Morse pair written twice: 0.4 eV, 1.5/Å, 2.8 Å, window [2.2, 4.0] Å, in atomic units.
        double ha = Units.EnergyConversion.HartreePerElectronVolt, bohr = 1 / (Units.PhysicalConstants.BohrRadiusMetre * 1e10);
        string atomic = Scenario
            .Replace("\"mass\": 39.9,", "\"units\": { \"energy\": \"hartree\", \"length\": \"bohr\" }, \"mass\": 39.9,")
            .Replace("\"wellDepth\": 0.4, \"width\": 1.5, \"equilibriumDistance\": 2.8", string.Create(System.Globalization.CultureInfo.InvariantCulture,
                $"\"wellDepth\": {0.4 * ha:R}, \"width\": {1.5 / bohr:R}, \"equilibriumDistance\": {2.8 * bohr:R}"))
            .Replace("\"window\": [2.2, 4.0]", string.Create(System.Globalization.CultureInfo.InvariantCulture, $"\"window\": [{2.2 * bohr:R}, {4.0 * bohr:R}]"));
        var a = ScenarioReader.Read(Encoding.UTF8.GetBytes(atomic));
        var b = ScenarioReader.Read(Encoding.UTF8.GetBytes(Scenario));
        Assert.Equal(b.Potential.Parameters["wellDepth"], a.Potential.Parameters["wellDepth"], 12);
        Assert.Equal(b.Potential.Parameters["equilibriumDistance"], a.Potential.Parameters["equilibriumDistance"], 12);
        Assert.Equal(b.Landscape.WindowUpper, a.Landscape.WindowUpper, 12);
    }

    [Fact]
    public void Warnings_read_in_the_scenarios_own_units()
    {
        const string message = "the confinement wall, 0.0079 eV above the minimum at (1.7, -0.98, 2.7) Å; within 0.216 Å of it, 0.06 Å² spread; 5.2 % of kT, 10 K.";
        Assert.Equal("the confinement wall, 7.9 meV above the minimum at (0.17, -0.098, 0.27) nm; within 0.0216 nm of it, 0.0006 nm² spread; 5.2 % of kT, 10 K.",
            UnitText.InUnits(message, "meV", "nm"));
        Assert.Equal(message, UnitText.InUnits(message, "eV", "angstrom"));
    }
}
