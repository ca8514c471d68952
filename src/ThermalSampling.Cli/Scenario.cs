using System;
using System.Collections.Generic;
using System.Collections.Immutable;
using System.Globalization;
using System.Linq;
using System.Text.Json;
using ThermalSampling.Landscapes;
using ThermalSampling.Sampling;

namespace ThermalSampling.Cli;

/// <summary>Energy units accepted in scenario files, with their size in eV.</summary>
internal static class ScenarioUnits
{
    internal static readonly IReadOnlyDictionary<string, double> Energy = new Dictionary<string, double>(StringComparer.Ordinal)
    {
        ["eV"] = 1.0,
        ["meV"] = 1e-3,
        ["kJ/mol"] = 1 / Units.EnergyConversion.KilojoulePerMolePerElectronVolt,
        ["kcal/mol"] = 1 / Units.EnergyConversion.KilocaloriePerMolePerElectronVolt,
        ["K"] = Units.PhysicalConstants.BoltzmannElectronVoltPerKelvin,
        ["hartree"] = 1 / Units.EnergyConversion.HartreePerElectronVolt,
        ["cm-1"] = 1 / Units.EnergyConversion.ReciprocalCentimetrePerElectronVolt,
    };

    internal static readonly IReadOnlyDictionary<string, double> Length = new Dictionary<string, double>(StringComparer.Ordinal)
    {
        ["angstrom"] = 1.0,
        ["nm"] = 10.0,
        ["pm"] = 0.01,
        ["bohr"] = Units.PhysicalConstants.BohrRadiusMetre * 1e10,
    };
}

/// <summary>A parsed, validated scenario in canonical units (eV, Å, u, K).</summary>
internal sealed record Scenario(
    string Title,
    string EnergyUnit,
    string LengthUnit,
    double MassInAtomicMassUnits,
    PotentialSpec Potential,
    LandscapeSpec Landscape,
    ImmutableArray<double> TemperaturesInKelvin,
    SamplingSettings Sampling)
{
    /// <summary>The scenario document exactly as given (echoed in every output document, so a result can be reproduced from its file alone).</summary>
    internal string SourceJson { get; init; } = "{}";

    /// <summary><c>output.symmetrise</c>: add the tensors averaged over the site's point group to site results.</summary>
    internal bool Symmetrise { get; init; }

    /// <summary><c>statistics</c>: "classical" (the default) or "quantum" (path-integral sampling; docs/quantum.md).</summary>
    internal string Statistics { get; init; } = "classical";

    /// <summary><c>beads</c>: the path integral's P (a power of two), or null for the default rule.</summary>
    internal int? Beads { get; init; }

    internal bool Quantum => Statistics == "quantum";

    /// <summary><c>sampling.reweightTo</c> (or <c>sweep --reweight-to</c>): the temperatures to reweight the sampled runs to, or null.</summary>
    internal (double From, double To, int Count)? ReweightTo { get; init; }

    /// <summary>The reweighting targets, K: <see cref="ReweightTo"/>'s count values evenly spaced (empty without one).</summary>
    internal double[] ReweightTargets => ReweightTo is not { } r ? []
        : [.. Enumerable.Range(0, r.Count).Select(i => r.Count == 1 ? r.From : r.From + (r.To - r.From) * i / (r.Count - 1))];

    /// <summary>With <c>"method": "replica-exchange"</c>: <c>sampling.ladder</c>, "given" (the temperatures are the ladder) or "auto" (rungs added from the target swap acceptance); null otherwise.</summary>
    internal string? Ladder { get; init; }

    /// <summary><c>sampling.targetSwapAcceptance</c> for an automatic ladder.</summary>
    internal double TargetSwapAcceptance { get; init; } = TemperatureLadders.DefaultTargetSwapAcceptance;

    internal double AngstromsPerLengthUnit => ScenarioUnits.Length[LengthUnit];
}

/// <summary>A potential form and its parameters in canonical units.</summary>
internal sealed record PotentialSpec(string Form, ImmutableDictionary<string, double> Parameters, ImmutableArray<double> TableR, ImmutableArray<double> TableEnergy);

/// <summary>A landscape in canonical units.</summary>
internal sealed record LandscapeSpec(string Kind, double WindowLower, double WindowUpper, ImmutableArray<Position> Sites, string? Lattice,
    double NearestNeighbourDistance, int Shells, Position Centre, Confinement? Confinement, MillerIndices? Facet = null, string? AdsorptionSite = null, int Layers = 3)
{
    /// <summary>For a structure with <c>pairs</c>: each site's species (aligned with <see cref="Sites"/>).</summary>
    internal ImmutableArray<string> SiteSpecies { get; init; } = [];

    /// <summary>For a structure with <c>pairs</c>: the pair potential of each neighbour species with the moving atom (absent: no short-range term).</summary>
    internal ImmutableDictionary<string, PotentialSpec>? Pairs { get; init; }

    /// <summary>For a structure with <c>pairs</c>: the moving atom's species.</summary>
    internal string? MovingSpecies { get; init; }

    /// <summary>For a structure with <c>pairs</c> and <c>mixing</c>: the species whose pair with the moving atom was mixed from the like pairs.</summary>
    internal ImmutableHashSet<string> Mixed { get; init; } = [];

    /// <summary>The mixing rule applied (named in reports), or null.</summary>
    internal string? MixingRule { get; init; }

    /// <summary>For a structure with <c>charges</c>: the charge of each species, e.</summary>
    internal ImmutableDictionary<string, double>? Charges { get; init; }

    /// <summary>For a structure with <c>charges</c>: the moving ion's Coulomb energy in the crystal's field (Ewald, as a polynomial about its site).</summary>
    internal PolynomialField? CoulombField { get; init; }
}

/// <summary>Reads scenario files. Every problem is collected (with its JSON path) and reported at once.</summary>
internal static class ScenarioReader
{
    internal const int MaximumBytes = 16 * 1024 * 1024;
    internal static readonly int MaximumTemperatures = ScenarioSchema.At("properties/temperatures").MaxItems;

    /// <summary>The lightest mass a scenario may give, u.</summary>
    internal static readonly double MinimumMass = ScenarioSchema.At("properties/mass").Minimum;

    /// <summary>The heaviest mass a scenario may give, u.</summary>
    internal static readonly double MaximumMass = ScenarioSchema.At("properties/mass").Maximum;

    private const string Potential = "properties/potential/oneOf", Landscape = "properties/landscape/oneOf", Sampling = "properties/sampling/properties/";

    private sealed class Context
    {
        internal List<string> Problems { get; } = new();

        internal void Add(string path, string message) => Problems.Add($"{path}: {message}");

        internal void CheckKeys(JsonElement obj, string path, params string[] allowed)
        {
            foreach (var p in obj.EnumerateObject())
            {
                if (!allowed.Contains(p.Name, StringComparer.Ordinal))
                {
                    Add($"{path}.{p.Name}", $"unknown key '{p.Name}'; allowed keys here: {string.Join(", ", allowed)}.");
                }
            }
        }

        internal JsonElement? Object(JsonElement parent, string key, string path, bool required = true)
        {
            if (!parent.TryGetProperty(key, out var e))
            {
                if (required)
                {
                    Add($"{path}.{key}", "is required.");
                }
                return null;
            }
            if (e.ValueKind != JsonValueKind.Object)
            {
                Add($"{path}.{key}", $"must be an object, not {Describe(e)}.");
                return null;
            }
            return e;
        }

        internal string? String(JsonElement parent, string key, string path, bool required, params string[] choices)
        {
            if (!parent.TryGetProperty(key, out var e))
            {
                if (required)
                {
                    Add($"{path}.{key}", choices.Length > 0 ? $"is required; one of: {string.Join(", ", choices)}." : "is required.");
                }
                return null;
            }
            if (e.ValueKind != JsonValueKind.String)
            {
                Add($"{path}.{key}", $"must be a string, not {Describe(e)}.");
                return null;
            }
            string s = e.GetString()!;
            if (choices.Length > 0 && !choices.Contains(s, StringComparer.Ordinal))
            {
                Add($"{path}.{key}", $"'{s}' is not valid; choose one of: {string.Join(", ", choices)}.");
                return null;
            }
            return s;
        }

        /// <summary>A number within the schema's <paramref name="bounds"/>.</summary>
        internal double? Number(JsonElement parent, string key, string path, bool required, Bounds bounds)
            => Number(parent, key, path, required, bounds.Minimum, bounds.Maximum, bounds.ExclusiveMinimum);

        /// <summary>An array of numbers within the schema's <paramref name="bounds"/> (its length and its items' range).</summary>
        internal double[]? Numbers(JsonElement parent, string key, string path, bool required, Bounds bounds)
            => Numbers(parent, key, path, required, bounds.MinItems, bounds.MaxItems, bounds.Minimum, bounds.Maximum, bounds.ExclusiveMinimum);

        /// <summary>A whole number within the schema's <paramref name="bounds"/>.</summary>
        internal long? Integer(JsonElement parent, string key, string path, bool required, Bounds bounds)
            => Integer(parent, key, path, required, (long)bounds.Minimum, (long)bounds.Maximum);

        private double? Number(JsonElement parent, string key, string path, bool required, double min, double max, bool exclusiveMin = false)
        {
            if (!parent.TryGetProperty(key, out var e))
            {
                if (required)
                {
                    Add($"{path}.{key}", "is required.");
                }
                return null;
            }
            return Value(e, $"{path}.{key}", min, max, exclusiveMin);
        }

        internal double? Value(JsonElement e, string path, double min, double max, bool exclusiveMin = false)
        {
            if (e.ValueKind != JsonValueKind.Number || !e.TryGetDouble(out double v) || !double.IsFinite(v))
            {
                Add(path, $"must be a finite number, not {Describe(e)}.");
                return null;
            }
            if (v < min || v > max || (exclusiveMin && v == min))
            {
                Add(path, string.Create(CultureInfo.InvariantCulture,
                    $"{v:R} is out of range; valid: {(exclusiveMin ? "greater than" : "at least")} {min:R}{(double.IsPositiveInfinity(max) ? "" : $" and at most {max:R}")}."));
                return null;
            }
            return v;
        }

        /// <summary>A required seed: a whole number from 0 to 2^64 − 1, the range of <see cref="SamplingSettings.Seed"/> and of --seed.</summary>
        internal ulong? Seed(JsonElement parent, string key, string path)
        {
            if (!parent.TryGetProperty(key, out var e))
            {
                Add($"{path}.{key}", "is required.");
                return null;
            }
            if (e.ValueKind != JsonValueKind.Number || !e.TryGetUInt64(out ulong v))
            {
                Add($"{path}.{key}", $"must be a whole number from 0 to {ulong.MaxValue}, not {Describe(e)}.");
                return null;
            }
            return v;
        }

        private long? Integer(JsonElement parent, string key, string path, bool required, long min, long max)
        {
            if (!parent.TryGetProperty(key, out var e))
            {
                if (required)
                {
                    Add($"{path}.{key}", "is required.");
                }
                return null;
            }
            if (e.ValueKind != JsonValueKind.Number || !e.TryGetInt64(out long v))
            {
                Add($"{path}.{key}", $"must be a whole number, not {Describe(e)}.");
                return null;
            }
            if (v < min || v > max)
            {
                Add($"{path}.{key}", string.Create(CultureInfo.InvariantCulture, $"{v} is out of range; valid: {min} to {max}."));
                return null;
            }
            return v;
        }

        private double[]? Numbers(JsonElement parent, string key, string path, bool required, int minCount, int maxCount, double min, double max, bool exclusiveMin = false)
        {
            if (!parent.TryGetProperty(key, out var e))
            {
                if (required)
                {
                    Add($"{path}.{key}", "is required.");
                }
                return null;
            }
            if (e.ValueKind != JsonValueKind.Array)
            {
                Add($"{path}.{key}", $"must be an array of numbers, not {Describe(e)}.");
                return null;
            }
            int count = e.GetArrayLength();
            if (count < minCount || count > maxCount)
            {
                Add($"{path}.{key}", string.Create(CultureInfo.InvariantCulture, $"has {count} entries; it needs {(minCount == maxCount ? $"exactly {minCount}" : $"{minCount} to {maxCount}")}."));
                return null;
            }
            var result = new double[count];
            bool ok = true;
            int i = 0;
            foreach (var item in e.EnumerateArray())
            {
                var v = Value(item, $"{path}.{key}[{i}]", min, max, exclusiveMin);
                ok &= v is not null;
                result[i++] = v ?? 0;
            }
            return ok ? result : null;
        }

        internal static string Describe(JsonElement e) => e.ValueKind switch
        {
            JsonValueKind.String => $"the string \"{Truncate(e.GetString()!)}\"",
            JsonValueKind.Number => $"the number {e.GetRawText()}",
            JsonValueKind.True or JsonValueKind.False => $"the boolean {e.GetRawText()}",
            JsonValueKind.Null => "null",
            JsonValueKind.Array => "an array",
            JsonValueKind.Object => "an object",
            _ => e.ValueKind.ToString(),
        };

        private static string Truncate(string s) => s.Length > 40 ? s[..40] + "…" : s;
    }

    /// <summary>Parses and validates a scenario.</summary>
    /// <param name="utf8">The file's bytes.</param>
    /// <exception cref="ScenarioException">With every problem found.</exception>
    internal static Scenario Read(ReadOnlySpan<byte> utf8)
    {
        if (utf8.Length > MaximumBytes)
        {
            throw new ScenarioException(new[] { string.Create(CultureInfo.InvariantCulture, $"$: the file is {utf8.Length} bytes; scenario files are limited to {MaximumBytes} bytes.") });
        }
        if (utf8.Trim(" \t\r\n"u8).IsEmpty)
        {
            throw new ScenarioException(new[] { "$: the file is empty; a scenario is a JSON object with mass, potential, landscape, temperatures and sampling (see docs/cli.md and docs/examples/scenarios/)." });
        }
        if (!System.Text.Unicode.Utf8.IsValid(utf8))
        {
            int index = 0, line = 1, column = 1;
            while (index < utf8.Length)
            {
                var status = System.Text.Rune.DecodeFromUtf8(utf8[index..], out var rune, out int consumed);
                if (status != System.Buffers.OperationStatus.Done)
                {
                    break;
                }
                if (rune.Value == '\n')
                {
                    line++;
                    column = 1;
                }
                else
                {
                    column++;
                }
                index += consumed;
            }
            throw new ScenarioException(new[] { string.Create(CultureInfo.InvariantCulture, $"$: not valid UTF-8 text: the byte at line {line}, column {column} (offset {index}) does not start a valid UTF-8 sequence. Save the file as UTF-8.") });
        }
        JsonDocument doc;
        try
        {
            doc = JsonDocument.Parse(utf8.ToArray(), new JsonDocumentOptions { MaxDepth = 32, CommentHandling = JsonCommentHandling.Disallow, AllowTrailingCommas = false });
        }
        catch (JsonException ex)
        {
            long line = (ex.LineNumber ?? 0) + 1, column = (ex.BytePositionInLine ?? 0) + 1;
            throw new ScenarioException(new[] { string.Create(CultureInfo.InvariantCulture, $"$: not valid JSON at line {line}, column {column}: {ex.Message.Split(". LineNumber")[0]}.") });
        }
        catch (ArgumentException ex)
        {
            throw new ScenarioException(new[] { "$: not valid UTF-8 text: " + ex.Message });
        }
        using (doc)
        {
            return Interpret(doc.RootElement);
        }
    }

    private static Scenario Interpret(JsonElement root)
    {
        var c = new Context();
        if (root.ValueKind != JsonValueKind.Object)
        {
            throw new ScenarioException(new[] { "$: the scenario must be a JSON object." });
        }
        c.CheckKeys(root, "$", "title", "units", "mass", "potential", "landscape", "temperatures", "sampling", "output", "statistics", "beads");
        string title = c.String(root, "title", "$", required: false) ?? "";
        string energyUnit = "eV", lengthUnit = "angstrom";
        if (c.Object(root, "units", "$", required: false) is { } units)
        {
            c.CheckKeys(units, "$.units", "energy", "length");
            energyUnit = c.String(units, "energy", "$.units", false, ScenarioUnits.Energy.Keys.ToArray()) ?? energyUnit;
            lengthUnit = c.String(units, "length", "$.units", false, ScenarioUnits.Length.Keys.ToArray()) ?? lengthUnit;
        }
        double e = ScenarioUnits.Energy[energyUnit], l = ScenarioUnits.Length[lengthUnit];
        // Atoms weigh from about 1 u (hydrogen) to about 300 u; 0.5 to 1000 u leaves room for reduced masses and clusters.
        // A number far outside is almost certainly a mass in kg or g typed where u is expected.
        double mass = c.Number(root, "mass", "$", true, new Bounds(0, double.MaxValue, true, 0, 0)) ?? 1;
        if (mass > 0 && (mass < MinimumMass || mass > MaximumMass)) // the schema's range, with words for the likely mistake
        {
            c.Add("$.mass", string.Create(CultureInfo.InvariantCulture,
                $"{mass:G4} is outside {MinimumMass}–{MaximumMass} u: the mass is in atomic mass units (u), not kg or g (an atom of 40 u weighs 6.6e-26 kg)."));
        }
        bool pairsGiven = root.TryGetProperty("landscape", out var landscapeElement) && landscapeElement.ValueKind == JsonValueKind.Object
            && landscapeElement.TryGetProperty("pairs", out _);
        if (pairsGiven && root.TryGetProperty("potential", out _))
        {
            c.Add("$.potential", "give the potentials once: the landscape's pairs name each species pair's potential, so there is no top-level potential with them.");
        }
        var potential = pairsGiven ? new PotentialSpec("pairs", ImmutableDictionary<string, double>.Empty, [], []) : ReadPotential(c, root, e, l);
        var landscape = ReadLandscape(c, root, l, e);
        var temperatures = c.Numbers(root, "temperatures", "$", true, ScenarioSchema.At("properties/temperatures")) ?? Array.Empty<double>();
        var duplicate = temperatures.GroupBy(t => t).FirstOrDefault(g => g.Count() > 1);
        if (duplicate is not null)
        {
            c.Add("$.temperatures", string.Create(CultureInfo.InvariantCulture, $"{duplicate.Key:R} K appears {duplicate.Count()} times; each temperature must appear once."));
        }
        var sampling = ReadSampling(c, root);
        bool symmetrise = false;
        if (c.Object(root, "output", "$", required: false) is { } output)
        {
            c.CheckKeys(output, "$.output", "bins", "scatteringVectors", "symmetrise", "siteRangeInSigmas");
            if (c.Number(output, "siteRangeInSigmas", "$.output", false, ScenarioSchema.At("properties/output/properties/siteRangeInSigmas")) is double range && sampling is not null)
            {
                sampling = sampling with { SiteDistributionHalfWidthInSigmas = range };
            }
            if (output.TryGetProperty("symmetrise", out var sym))
            {
                if (sym.ValueKind is not (JsonValueKind.True or JsonValueKind.False))
                {
                    c.Add("$.output.symmetrise", $"must be true or false, not {Context.Describe(sym)}.");
                }
                else if (sym.GetBoolean() && landscape is not null && landscape.Kind is "line" or "radial")
                {
                    c.Add("$.output.symmetrise", "applies to sites only: a line or radial pair has no point group to average over.");
                }
                else
                {
                    symmetrise = sym.GetBoolean();
                }
            }
            if (c.Integer(output, "bins", "$.output", false, ScenarioSchema.At("properties/output/properties/bins")) is long bins && sampling is not null)
            {
                sampling = sampling with { HistogramBins = (int)bins };
            }
            if (output.TryGetProperty("scatteringVectors", out var waves) && landscape is not null
                && ReadScatteringVectors(c, waves, landscape.Kind is "line" or "radial" ? 1 : 3, l) is { } q && sampling is not null)
            {
                sampling = sampling with { ScatteringVectorsInInverseAngstroms = [.. q] };
            }
        }
        (double, double, int)? reweightTo = null;
        if (root.TryGetProperty("sampling", out var samplingElement) && samplingElement.ValueKind == JsonValueKind.Object
            && c.Object(samplingElement, "reweightTo", "$.sampling", required: false) is { } rw)
        {
            const string rwPath = "$.sampling.reweightTo";
            c.CheckKeys(rw, rwPath, "from", "to", "count");
            const string rwSchema = "properties/sampling/properties/reweightTo/properties/";
            double? from = c.Number(rw, "from", rwPath, true, ScenarioSchema.At(rwSchema + "from"));
            double? to = c.Number(rw, "to", rwPath, true, ScenarioSchema.At(rwSchema + "to"));
            long? count = c.Integer(rw, "count", rwPath, true, ScenarioSchema.At(rwSchema + "count"));
            if (from is double f && to is double t && count is long n)
            {
                if (!(f < t) && !(n == 1 && f == t))
                {
                    c.Add(rwPath, string.Create(CultureInfo.InvariantCulture, $"from ({f:R} K) must be below to ({t:R} K) (or equal, with count 1)."));
                }
                else
                {
                    reweightTo = (f, t, (int)n);
                }
            }
        }
        string statistics = c.String(root, "statistics", "$", false, ["classical", "quantum"]) ?? "classical";
        if (reweightTo is not null && statistics == "quantum")
        {
            c.Add("$.sampling.reweightTo", "reweighting across temperatures applies to classical statistics; a quantum run's ring polymers are not reweighted.");
        }
        string? ladder = null;
        double targetSwap = TemperatureLadders.DefaultTargetSwapAcceptance;
        if (sampling is { SwapInterval: not null })
        {
            ladder = c.String(samplingElement, "ladder", "$.sampling", false, "given", "auto") ?? "given";
            targetSwap = c.Number(samplingElement, "targetSwapAcceptance", "$.sampling", false, ScenarioSchema.At(Sampling + "targetSwapAcceptance")) ?? targetSwap;
            if (temperatures.Length < 2)
            {
                c.Add("$.temperatures", "replica exchange runs the temperatures as one ladder and needs at least two.");
            }
            else if (!temperatures.Zip(temperatures.Skip(1)).All(t => t.First < t.Second))
            {
                c.Add("$.temperatures", "a replica-exchange ladder lists its temperatures from the coldest to the hottest.");
            }
            if (statistics == "quantum")
            {
                c.Add("$.sampling.method", "replica exchange swaps classical configurations; quantum statistics (ring polymers) use \"metropolis\".");
            }
            if (reweightTo is not null)
            {
                c.Add("$.sampling.reweightTo", "reweighting is not offered with replica exchange yet; give the temperatures you need as rungs of the ladder (or \"ladder\": \"auto\" to add rungs between them).");
            }
        }
        int? beads = (int?)c.Integer(root, "beads", "$", false, ScenarioSchema.At("properties/beads"));
        if (beads is int b && (b & (b - 1)) != 0)
        {
            c.Add("$.beads", string.Create(CultureInfo.InvariantCulture, $"{b} is not a power of two; the path integral extrapolates from P/2 and P beads, so P must be 2, 4, 8, … {PathIntegralSampler.MaxBeads}."));
        }
        if (beads is not null && statistics != "quantum")
        {
            c.Add("$.beads", "applies only with \"statistics\": \"quantum\" (the path integral's beads).");
        }
        if (statistics == "quantum" && sampling is not null && sampling.Method != SamplingMethod.Metropolis)
        {
            c.Add("$.sampling.method", "quantum statistics walk ring polymers of beads and need \"metropolis\", not \"direct\".");
        }
        if (c.Problems.Count > 0)
        {
            throw new ScenarioException(c.Problems);
        }
        return new Scenario(title, energyUnit, lengthUnit, mass, potential!, landscape!, temperatures.ToImmutableArray(), sampling!)
        {
            SourceJson = root.GetRawText(),
            Symmetrise = symmetrise,
            Statistics = statistics,
            Beads = beads,
            ReweightTo = reweightTo,
            Ladder = ladder,
            TargetSwapAcceptance = targetSwap,
        };
    }

    /// <summary>
    /// <c>output.scatteringVectors</c>: a number per q (<paramref name="components"/> = 1, a pair) or [q_x, q_y, q_z] per
    /// vector (a site), in inverse scenario length units, converted to Å⁻¹ and held to the library's ±1000 Å⁻¹.
    /// </summary>
    private static double[]? ReadScatteringVectors(Context c, JsonElement array, int components, double angstromsPerUnit)
    {
        const string path = "$.output.scatteringVectors";
        var bounds = ScenarioSchema.At("properties/output/properties/scatteringVectors");
        var item = ScenarioSchema.At("$defs/vector");
        if (array.ValueKind != JsonValueKind.Array)
        {
            c.Add(path, "must be an array of scattering vectors.");
            return null;
        }
        if (array.GetArrayLength() > bounds.MaxItems)
        {
            c.Add(path, string.Create(CultureInfo.InvariantCulture, $"has {array.GetArrayLength()} vectors; at most {bounds.MaxItems} are allowed."));
            return null;
        }
        var values = new List<double>();
        int problems = c.Problems.Count, i = 0;
        foreach (var q in array.EnumerateArray())
        {
            string at = string.Create(CultureInfo.InvariantCulture, $"{path}[{i++}]");
            if (q.ValueKind == JsonValueKind.Object)
            {
                // {"sinThetaOverLambda": s} (a pair) or {"sinThetaOverLambda": s, "direction": [x, y, z]} (a site): |q| = 4π s.
                c.CheckKeys(q, at, components == 1 ? ["sinThetaOverLambda"] : ["sinThetaOverLambda", "direction"]);
                double? stl = c.Number(q, "sinThetaOverLambda", at, true, ScenarioSchema.At("$defs/sinThetaOverLambda"));
                if (components == 1)
                {
                    values.Add(stl is double one ? 4 * Math.PI * one / angstromsPerUnit : double.NaN);
                    continue;
                }
                var direction = c.Numbers(q, "direction", at, true, item);
                if (stl is double st && direction is { Length: 3 } d)
                {
                    double norm = Math.Sqrt(d[0] * d[0] + d[1] * d[1] + d[2] * d[2]);
                    if (!(norm > 0))
                    {
                        c.Add($"{at}.direction", "must not be the zero vector.");
                        continue;
                    }
                    values.AddRange(d.Select(x => 4 * Math.PI * st * x / norm / angstromsPerUnit));
                }
                else
                {
                    values.AddRange([double.NaN, double.NaN, double.NaN]);
                }
                continue;
            }
            if (components == 1)
            {
                if (q.ValueKind == JsonValueKind.Array)
                {
                    c.Add(at, "a line or radial pair takes one number per scattering vector, not [qx, qy, qz].");
                    continue;
                }
                values.Add(c.Value(q, at, item.Minimum, item.Maximum) is double v ? v / angstromsPerUnit : double.NaN);
                continue;
            }
            if (q.ValueKind != JsonValueKind.Array || q.GetArrayLength() != 3)
            {
                c.Add(at, $"a site takes [qx, qy, qz] per scattering vector, not {Context.Describe(q)}.");
                continue;
            }
            int k = 0;
            foreach (var component in q.EnumerateArray())
            {
                values.Add(c.Value(component, string.Create(CultureInfo.InvariantCulture, $"{at}[{k++}]"), item.Minimum, item.Maximum) is double v ? v / angstromsPerUnit : double.NaN);
            }
        }
        for (int n = 0; n < values.Count; n++)
        {
            if (Math.Abs(values[n]) > SamplingSettings.MaxScatteringVectorInInverseAngstroms)
            {
                c.Add(string.Create(CultureInfo.InvariantCulture, $"{path}[{n / components}]"), string.Create(CultureInfo.InvariantCulture,
                    $"{values[n] * angstromsPerUnit:R} per {(angstromsPerUnit == 1 ? "angstrom" : "length unit")} is {Math.Abs(values[n]):G4} per angstrom; valid: at most {SamplingSettings.MaxScatteringVectorInInverseAngstroms} per angstrom in size."));
            }
        }
        return c.Problems.Count == problems ? [.. values] : null;
    }

    private static PotentialSpec? ReadPotential(Context c, JsonElement root, double e, double l, string parentPath = "$", bool required = true)
    {
        if (c.Object(root, "potential", parentPath, required) is not { } p)
        {
            return null;
        }
        string path = parentPath + ".potential";
        string? form = c.String(p, "form", path, true, "lennard-jones", "morse", "buckingham", "harmonic", "table");
        var values = ImmutableDictionary.CreateBuilder<string, double>();
        void Put(string key, double? v, double scale)
        {
            if (v is double x)
            {
                values[key] = x * scale;
            }
        }
        switch (form)
        {
            case "lennard-jones":
                bool sigmaForm = p.TryGetProperty("sigma", out _) || p.TryGetProperty("epsilon", out _);
                bool minimumForm = p.TryGetProperty("equilibriumDistance", out _) || p.TryGetProperty("wellDepth", out _);
                if (sigmaForm && minimumForm)
                {
                    c.Add(path, "give either {sigma, epsilon} or {equilibriumDistance, wellDepth}, not both.");
                }
                if (sigmaForm)
                {
                    c.CheckKeys(p, path, "form", "sigma", "epsilon");
                    Put("sigma", c.Number(p, "sigma", path, true, ScenarioSchema.At(Potential + "[sigma]/properties/sigma")), l);
                    Put("epsilon", c.Number(p, "epsilon", path, true, ScenarioSchema.At(Potential + "[sigma]/properties/epsilon")), e);
                }
                else
                {
                    c.CheckKeys(p, path, "form", "equilibriumDistance", "wellDepth");
                    Put("equilibriumDistance", c.Number(p, "equilibriumDistance", path, true, ScenarioSchema.At(Potential + "[form=lennard-jones,wellDepth]/properties/equilibriumDistance")), l);
                    Put("wellDepth", c.Number(p, "wellDepth", path, true, ScenarioSchema.At(Potential + "[form=lennard-jones,wellDepth]/properties/wellDepth")), e);
                }
                break;
            case "morse":
                c.CheckKeys(p, path, "form", "wellDepth", "width", "equilibriumDistance");
                Put("wellDepth", c.Number(p, "wellDepth", path, true, ScenarioSchema.At(Potential + "[form=morse]/properties/wellDepth")), e);
                Put("width", c.Number(p, "width", path, true, ScenarioSchema.At(Potential + "[form=morse]/properties/width")), 1 / l);
                Put("equilibriumDistance", c.Number(p, "equilibriumDistance", path, true, ScenarioSchema.At(Potential + "[form=morse]/properties/equilibriumDistance")), l);
                break;
            case "buckingham":
                c.CheckKeys(p, path, "form", "A", "rho", "C");
                Put("A", c.Number(p, "A", path, true, ScenarioSchema.At(Potential + "[form=buckingham]/properties/A")), e);
                Put("rho", c.Number(p, "rho", path, true, ScenarioSchema.At(Potential + "[form=buckingham]/properties/rho")), l);
                Put("C", c.Number(p, "C", path, true, ScenarioSchema.At(Potential + "[form=buckingham]/properties/C")), e * Math.Pow(l, 6));
                break;
            case "harmonic":
                c.CheckKeys(p, path, "form", "stiffness", "equilibriumDistance");
                Put("stiffness", c.Number(p, "stiffness", path, true, ScenarioSchema.At(Potential + "[form=harmonic]/properties/stiffness")), e / (l * l));
                Put("equilibriumDistance", c.Number(p, "equilibriumDistance", path, true, ScenarioSchema.At(Potential + "[form=harmonic]/properties/equilibriumDistance")), l);
                break;
            case "table":
                c.CheckKeys(p, path, "form", "r", "energy");
                var r = c.Numbers(p, "r", path, true, ScenarioSchema.At(Potential + "[form=table]/properties/r"));
                var v = c.Numbers(p, "energy", path, true, ScenarioSchema.At(Potential + "[form=table]/properties/energy"));
                if (r is not null && v is not null && r.Length != v.Length)
                {
                    c.Add($"{path}.energy", $"has {v.Length} values but $.potential.r has {r.Length}; they must have the same length.");
                }
                if (r is not null)
                {
                    for (int i = 1; i < r.Length; i++)
                    {
                        if (!(r[i] > r[i - 1]))
                        {
                            c.Add($"{path}.r[{i}]", string.Create(CultureInfo.InvariantCulture, $"{r[i]:R} is not greater than r[{i - 1}] = {r[i - 1]:R}; r must be strictly increasing (sorted, no duplicates)."));
                            break;
                        }
                    }
                }
                return new PotentialSpec(form, values.ToImmutable(), (r ?? Array.Empty<double>()).Select(x => x * l).ToImmutableArray(),
                    (v ?? Array.Empty<double>()).Select(x => x * e).ToImmutableArray());
        }
        return form is null ? null : new PotentialSpec(form, values.ToImmutable(), ImmutableArray<double>.Empty, ImmutableArray<double>.Empty);
    }

    private static LandscapeSpec? ReadLandscape(Context c, JsonElement root, double l, double e)
    {
        if (c.Object(root, "landscape", "$") is not { } p)
        {
            return null;
        }
        const string path = "$.landscape";
        string? kind = c.String(p, "kind", path, true, "line", "radial", "sites", "structure");
        if (kind == "structure")
        {
            return ReadStructure(c, p, path, l, e);
        }
        if (kind is "line" or "radial")
        {
            c.CheckKeys(p, path, "kind", "window");
            var w = c.Numbers(p, "window", path, true, ScenarioSchema.At(Landscape + "[kind=line]/properties/window"));
            if (w is not null && !(w[0] < w[1]))
            {
                c.Add($"{path}.window", string.Create(CultureInfo.InvariantCulture, $"[{w[0]:R}, {w[1]:R}] is empty or reversed; the lower bound must be smaller than the upper bound."));
            }
            return new LandscapeSpec(kind, (w?[0] ?? 0) * l, (w?[1] ?? 1) * l, ImmutableArray<Position>.Empty, null, 0, 0, Position.Origin, null);
        }
        if (kind != "sites")
        {
            return null;
        }
        c.CheckKeys(p, path, "kind", "sites", "lattice", "facet", "adsorptionSite", "layers", "nearestNeighbourDistance", "shells", "centre", "confinement");
        var sites = ImmutableArray<Position>.Empty;
        string? lattice = null;
        double nn = 0;
        int shells = 1;
        bool explicitSites = p.TryGetProperty("sites", out var siteArray);
        bool surfaceSites = p.TryGetProperty("facet", out _);
        if (explicitSites && (p.TryGetProperty("lattice", out _) || surfaceSites))
        {
            c.Add(path, "give exactly one of sites or lattice (with facet for a surface).");
        }
        else if (!explicitSites && !p.TryGetProperty("lattice", out _))
        {
            c.Add(path, "give sites, or a lattice (with facet for a surface).");
        }
        if (!surfaceSites && p.TryGetProperty("adsorptionSite", out _))
        {
            c.Add($"{path}.adsorptionSite", "needs facet: an adsorption site is a place on a surface (lattice plus facet [h, k, l]).");
        }
        MillerIndices? facet = null;
        string? adsorption = null;
        int layers = 3;
        if (explicitSites)
        {
            var siteBounds = ScenarioSchema.At(Landscape + "[sites]/properties/sites");
            var coordinate = ScenarioSchema.At(Landscape + "[sites]/properties/sites/items");
            if (siteArray.ValueKind != JsonValueKind.Array || siteArray.GetArrayLength() < siteBounds.MinItems || siteArray.GetArrayLength() > siteBounds.MaxItems)
            {
                c.Add($"{path}.sites", string.Create(CultureInfo.InvariantCulture,
                    $"must be a non-empty array (at most {siteBounds.MaxItems}) of [x, y, z] positions."));
            }
            else
            {
                var list = ImmutableArray.CreateBuilder<Position>();
                int i = 0;
                foreach (var s in siteArray.EnumerateArray())
                {
                    var xyz = s.ValueKind == JsonValueKind.Array && s.GetArrayLength() == 3
                        ? s.EnumerateArray().Select((v, k) => c.Value(v, $"{path}.sites[{i}][{k}]", coordinate.Minimum, coordinate.Maximum)).ToArray()
                        : null;
                    if (xyz is null)
                    {
                        c.Add($"{path}.sites[{i}]", "must be an array of three numbers [x, y, z].");
                    }
                    else if (xyz.All(v => v is not null))
                    {
                        list.Add(new Position(xyz[0]!.Value * l, xyz[1]!.Value * l, xyz[2]!.Value * l));
                    }
                    i++;
                }
                sites = list.ToImmutable();
            }
        }
        else if (surfaceSites)
        {
            lattice = c.String(p, "lattice", path, true, "fcc", "bcc", "sc");
            var hkl = c.Numbers(p, "facet", path, true, ScenarioSchema.At(Landscape + "[facet]/properties/facet"));
            if (hkl is not null)
            {
                if (hkl.Any(x => x != Math.Round(x)))
                {
                    c.Add($"{path}.facet", "Miller indices must be integers, for example [1, 1, 1].");
                }
                else if (hkl.All(x => x == 0))
                {
                    c.Add($"{path}.facet", "[0, 0, 0] is not a plane: at least one Miller index must be non-zero.");
                }
                else
                {
                    facet = new MillerIndices((int)hkl[0], (int)hkl[1], (int)hkl[2]);
                }
            }
            adsorption = c.String(p, "adsorptionSite", path, true, "top", "bridge", "hollow", "fcc-hollow", "hcp-hollow");
            nn = (c.Number(p, "nearestNeighbourDistance", path, true, ScenarioSchema.At(Landscape + "[facet]/properties/nearestNeighbourDistance")) ?? 1) * l;
            layers = (int)(c.Integer(p, "layers", path, false, ScenarioSchema.At(Landscape + "[facet]/properties/layers")) ?? 3);
        }
        else if (!explicitSites && p.TryGetProperty("lattice", out _))
        {
            lattice = c.String(p, "lattice", path, true, "fcc", "bcc", "sc", "hcp");
            nn = (c.Number(p, "nearestNeighbourDistance", path, true, ScenarioSchema.At(Landscape + "[shells]/properties/nearestNeighbourDistance")) ?? 1) * l;
            shells = (int)(c.Integer(p, "shells", path, false, ScenarioSchema.At(Landscape + "[shells]/properties/shells")) ?? 1);
        }
        var centre = Position.Origin;
        if (p.TryGetProperty("centre", out _))
        {
            var cc = c.Numbers(p, "centre", path, false, ScenarioSchema.At(Landscape + "[shells]/properties/centre"));
            if (cc is not null)
            {
                centre = new Position(cc[0] * l, cc[1] * l, cc[2] * l);
            }
        }
        var confinement = ReadConfinement(c, p, path, l);
        return new LandscapeSpec(kind, 0, 0, sites, lattice, nn, shells, centre, confinement, facet, adsorption, layers);
    }

    /// <summary>
    /// A site among the atoms of a structure given inline as XYZ text (Å, as XYZ files are; plain, or extended with a
    /// Lattice cell): the moving atom by its 1-based number, its neighbours within the cutoff (periodic images included,
    /// optionally only some species), confined about the atom's own position. One pair potential serves every neighbour,
    /// so neighbours of several species are refused unless <c>species</c> picks them.
    /// </summary>
    private static LandscapeSpec? ReadStructure(Context c, JsonElement p, string path, double l, double e)
    {
        c.CheckKeys(p, path, "kind", "xyz", "cif", "file", "atom", "atomLabel", "movingAtom", "cutoff", "species", "confinement", "pairs", "charges", "mixing");
        string? mixing = c.String(p, "mixing", path, false, "lorentz-berthelot", "geometric");
        ImmutableDictionary<string, double>? charges = null;
        if (p.TryGetProperty("charges", out var chargesElement))
        {
            if (chargesElement.ValueKind != JsonValueKind.Object)
            {
                c.Add($"{path}.charges", $"must be an object of charges per species label (e), such as {{\"Na\": 1, \"Cl\": -1}}, not {Context.Describe(chargesElement)}.");
            }
            else
            {
                var builder = ImmutableDictionary.CreateBuilder<string, double>();
                foreach (var property in chargesElement.EnumerateObject())
                {
                    if (property.Value.ValueKind == JsonValueKind.Number && property.Value.TryGetDouble(out double q) && double.IsFinite(q) && Math.Abs(q) <= 10)
                    {
                        builder[property.Name] = q;
                    }
                    else
                    {
                        c.Add($"{path}.charges.{property.Name}", $"must be a charge in e from −10 to 10, not {Context.Describe(property.Value)}.");
                    }
                }
                charges = builder.ToImmutable();
            }
        }
        if (p.TryGetProperty("file", out _))
        {
            c.Add($"{path}.file", "a structure file is read when the scenario is loaded from its own file (the command line does this, relative to the scenario's folder); scenario text read on its own must carry the structure as cif or xyz text.");
            return null;
        }
        bool isCif = p.TryGetProperty("cif", out _);
        if (isCif == p.TryGetProperty("xyz", out _))
        {
            c.Add(path, "give exactly one of xyz (XYZ text) or cif (CIF text).");
            return null;
        }
        string? text = c.String(p, isCif ? "cif" : "xyz", path, true);
        // The moving atom: its number from 1, or the first atom of a species label (for a CIF, the type symbol).
        long? atom = null;
        string? atomLabel = null, siteLabel = null;
        int ways = (p.TryGetProperty("atom", out _) ? 1 : 0) + (p.TryGetProperty("atomLabel", out _) ? 1 : 0) + (p.TryGetProperty("movingAtom", out _) ? 1 : 0);
        if (ways != 1)
        {
            c.Add(path, "give exactly one of movingAtom (a CIF atom-site label, or the atom's number from 1), atom (its number from 1) or atomLabel (a species label).");
        }
        else if (p.TryGetProperty("movingAtom", out var movingElement))
        {
            if (movingElement.ValueKind == JsonValueKind.String && movingElement.GetString() is { Length: > 0 } name)
            {
                siteLabel = name;
            }
            else if (movingElement.ValueKind == JsonValueKind.Number && movingElement.TryGetInt64(out long index) && index >= 1)
            {
                atom = index;
            }
            else
            {
                c.Add($"{path}.movingAtom", $"must be an atom-site label (a string) or the atom's number from 1, not {Context.Describe(movingElement)}.");
            }
        }
        else if (p.TryGetProperty("atomLabel", out _))
        {
            atomLabel = c.String(p, "atomLabel", path, true);
        }
        else
        {
            atom = c.Integer(p, "atom", path, true, ScenarioSchema.At(Landscape + "[cutoff]/properties/atom"));
        }
        double? cutoff = c.Number(p, "cutoff", path, true, ScenarioSchema.At(Landscape + "[cutoff]/properties/cutoff"));
        string[]? species = null;
        if (p.TryGetProperty("species", out var sp))
        {
            species = sp.ValueKind == JsonValueKind.Array && sp.EnumerateArray().All(e => e.ValueKind == JsonValueKind.String) && sp.GetArrayLength() > 0
                ? [.. sp.EnumerateArray().Select(e => e.GetString()!)] : null;
            if (species is null)
            {
                c.Add($"{path}.species", "must be a non-empty array of species labels, such as [\"Ar\"].");
            }
        }
        var confinement = ReadConfinement(c, p, path, l);
        if (text is null || (atom is null && atomLabel is null && siteLabel is null) || cutoff is null)
        {
            return null;
        }
        Structure structure;
        try
        {
            structure = isCif ? CifReader.Read(new System.IO.StringReader(text), "$.landscape.cif") : StructureFiles.ReadXyz(new System.IO.StringReader(text), "$.landscape.xyz");
        }
        catch (StructureFormatException ex)
        {
            c.Add($"{path}.{(isCif ? "cif" : "xyz")}", ex.Message);
            return null;
        }
        if (siteLabel is not null)
        {
            // A CIF atom-site label first (its first copy in the expanded cell), else a species label.
            int found = structure.Atoms.ToList().FindIndex(a => a.Label == siteLabel);
            found = found >= 0 ? found : structure.Atoms.ToList().FindIndex(a => a.Species == siteLabel);
            if (found < 0)
            {
                var names = structure.Atoms.Select(a => a.Label ?? a.Species).Distinct().Take(12);
                c.Add($"{path}.movingAtom", $"'{siteLabel}' is not an atom of the structure (its atoms: {string.Join(", ", names)}).");
                return null;
            }
            atom = found + 1;
        }
        if (atomLabel is not null)
        {
            int found = structure.Atoms.ToList().FindIndex(a => a.Species == atomLabel);
            if (found < 0)
            {
                c.Add($"{path}.atom", $"no atom of the structure is labelled '{atomLabel}' (labels: {string.Join(", ", structure.Atoms.Select(a => a.Species).Distinct().Take(10))}).");
                return null;
            }
            atom = found + 1;
        }
        if (atom > structure.Atoms.Length)
        {
            c.Add($"{path}.atom", string.Create(CultureInfo.InvariantCulture, $"{atom} is beyond the structure's {structure.Atoms.Length} atoms (numbered from 1)."));
            return null;
        }
        var neighbours = structure.NeighboursOf((int)atom!.Value - 1, Units.Length.FromAngstroms(cutoff.Value * l))
            .Where(n => species is null || species.Contains(n.Species)).ToList();
        var kinds = neighbours.Select(n => n.Species).Distinct().ToList();
        if (neighbours.Count == 0)
        {
            c.Add($"{path}.cutoff", string.Create(CultureInfo.InvariantCulture, $"no{(species is null ? "" : " chosen")} atom lies within {cutoff:R} of atom {atom}."));
            return null;
        }
        string moving = structure.Atoms[(int)atom.Value - 1].Species;
        PolynomialField? coulomb = null;
        if (charges is not null && confinement is { } box)
        {
            foreach (var label in charges.Keys.Where(k => !structure.Atoms.Any(a => a.Species == k)))
            {
                c.Add($"{path}.charges.{label}", $"species '{label}' is not in the structure (its species: {string.Join(", ", structure.Atoms.Select(a => a.Species).Distinct())}).");
                return null;
            }
            double reach = box.Shape == ConfinementShape.Sphere ? box.SizeInAngstroms : box.SizeInAngstroms * Math.Sqrt(3);
            try
            {
                coulomb = CoulombSite.Field(structure, (int)atom.Value - 1, charges, 1.05 * reach);
            }
            catch (ArgumentException ex)
            {
                c.Add($"{path}.charges", ex.Message.Split(" (Parameter '")[0]);
                return null;
            }
        }
        if (p.TryGetProperty("pairs", out var pairsElement))
        {
            var pairs = ReadPairs(c, pairsElement, $"{path}.pairs", moving, structure, e, l, mixing, out var mixed);
            if (pairs is null)
            {
                return null;
            }
            return new LandscapeSpec("sites", 0, 0, [.. neighbours.Select(n => n.Position)], null, 0, 0, structure.Atoms[(int)atom.Value - 1].Position, confinement)
            {
                SiteSpecies = [.. neighbours.Select(n => n.Species)],
                Pairs = pairs,
                MovingSpecies = moving,
                Charges = charges,
                CoulombField = coulomb,
                Mixed = mixed,
                MixingRule = mixed.Count == 0 ? null : mixing == "geometric" ? "geometric" : "Lorentz–Berthelot",
            };
        }
        if (kinds.Count > 1)
        {
            c.Add($"{path}.species", $"the neighbours are of {kinds.Count} species ({string.Join(", ", kinds)}), and one pair potential serves every neighbour: choose them with \"species\", such as [\"{kinds[0]}\"], or give each species pair its potential with \"pairs\".");
            return null;
        }
        return new LandscapeSpec("sites", 0, 0, [.. neighbours.Select(n => n.Position)], null, 0, 0, structure.Atoms[(int)atom.Value - 1].Position, confinement)
        {
            Charges = charges,
            CoulombField = coulomb,
            MovingSpecies = moving,
        };
    }

    /// <summary>
    /// <c>pairs</c>: [{"between": [species, species], "potential": {…}}, …], each pair once, each species in the structure;
    /// returns the potential of each species with the moving atom's species (pairs not involving it are refused: only the
    /// moving atom's pairs act on it).
    /// </summary>
    private static ImmutableDictionary<string, PotentialSpec>? ReadPairs(Context c, JsonElement array, string path, string moving, Structure structure, double e, double l,
        string? mixing, out ImmutableHashSet<string> mixed)
    {
        mixed = [];
        var like = new Dictionary<string, PotentialSpec>();
        if (array.ValueKind != JsonValueKind.Array || array.GetArrayLength() == 0)
        {
            c.Add(path, $"must be a non-empty array of {{\"between\": [species, species], \"potential\": {{…}}}}, not {Context.Describe(array)}.");
            return null;
        }
        var present = structure.Atoms.Select(a => a.Species).ToHashSet();
        var result = ImmutableDictionary.CreateBuilder<string, PotentialSpec>();
        int i = 0;
        bool ok = true;
        foreach (var entry in array.EnumerateArray())
        {
            string at = $"{path}[{i++}]";
            if (entry.ValueKind != JsonValueKind.Object)
            {
                c.Add(at, $"must be an object {{\"between\": [species, species], \"potential\": {{…}}}}, not {Context.Describe(entry)}.");
                ok = false;
                continue;
            }
            c.CheckKeys(entry, at, "between", "potential");
            string[]? between = entry.TryGetProperty("between", out var b) && b.ValueKind == JsonValueKind.Array && b.GetArrayLength() == 2
                && b.EnumerateArray().All(x => x.ValueKind == JsonValueKind.String) ? [.. b.EnumerateArray().Select(x => x.GetString()!)] : null;
            if (between is null)
            {
                c.Add($"{at}.between", "must be two species labels, such as [\"Na\", \"Cl\"].");
                ok = false;
                continue;
            }
            foreach (var species in between.Where(x => !present.Contains(x)))
            {
                c.Add($"{at}.between", $"species '{species}' is not in the structure (its species: {string.Join(", ", present)}).");
                ok = false;
            }
            var potential = ReadPotential(c, entry, e, l, at);
            if (potential is { Form: "table" })
            {
                c.Add($"{at}.potential.form", "a species pair takes lennard-jones, morse, buckingham or harmonic (a table serves one-species landscapes).");
                ok = false;
            }
            if (mixing is not null && between[0] == between[1] && potential is not null)
            {
                like[between[0]] = potential; // a like pair, for mixing
            }
            if (!between.Contains(moving))
            {
                if (mixing is not null && between[0] == between[1])
                {
                    continue;
                }
                c.Add($"{at}.between", $"[{between[0]}, {between[1]}] does not involve the moving atom's species '{moving}'; the fixed atoms do not move, so only the moving atom's pairs act (like pairs such as [{between[0]}, {between[0]}] serve \"mixing\").");
                ok = false;
                continue;
            }
            string other = between[0] == moving ? between[1] : between[0];
            if (result.ContainsKey(other))
            {
                c.Add($"{at}.between", $"the pair [{moving}, {other}] is given twice; give each pair once.");
                ok = false;
                continue;
            }
            if (potential is not null)
            {
                result[other] = potential;
            }
        }
        if (ok && mixing is not null && like.TryGetValue(moving, out var own))
        {
            var made = ImmutableHashSet.CreateBuilder<string>();
            foreach (var species in structure.Atoms.Select(a => a.Species).Distinct().Where(x => !result.ContainsKey(x) && like.ContainsKey(x)))
            {
                var mix = Mix(own, like[species], mixing);
                if (mix is null)
                {
                    c.Add(path, $"\"mixing\": \"{mixing}\" cannot combine the [{moving}, {moving}] {own.Form} pair with the [{species}, {species}] {like[species].Form} pair (Lorentz–Berthelot mixes lennard-jones; geometric mixes buckingham or morse, each with its own form).");
                    return null;
                }
                result[species] = mix;
                made.Add(species);
            }
            mixed = made.ToImmutable();
        }
        return ok ? result.ToImmutable() : null;
    }

    /// <summary>An unlike pair from two like pairs by the rule (null when the rule does not combine their forms).</summary>
    private static PotentialSpec? Mix(PotentialSpec a, PotentialSpec b, string rule)
    {
        if (a.Form != b.Form)
        {
            return null;
        }
        var pa = a.Parameters;
        var pb = b.Parameters;
        double Sigma(ImmutableDictionary<string, double> q) => q.TryGetValue("sigma", out double s) ? s : q["equilibriumDistance"] / Math.Pow(2, 1.0 / 6);
        double Epsilon(ImmutableDictionary<string, double> q) => q.TryGetValue("epsilon", out double s) ? s : q["wellDepth"];
        ImmutableDictionary<string, double> Of(params (string Key, double Value)[] values) => values.ToImmutableDictionary(v => v.Key, v => v.Value);
        return (rule, a.Form) switch
        {
            ("lorentz-berthelot", "lennard-jones") => new PotentialSpec("lennard-jones", Of(("sigma", 0.5 * (Sigma(pa) + Sigma(pb))), ("epsilon", Math.Sqrt(Epsilon(pa) * Epsilon(pb)))), [], []),
            ("geometric", "buckingham") => new PotentialSpec("buckingham", Of(("A", Math.Sqrt(pa["A"] * pb["A"])), ("rho", 0.5 * (pa["rho"] + pb["rho"])), ("C", Math.Sqrt(pa["C"] * pb["C"]))), [], []),
            ("geometric", "morse") => new PotentialSpec("morse", Of(("wellDepth", Math.Sqrt(pa["wellDepth"] * pb["wellDepth"])), ("width", 0.5 * (pa["width"] + pb["width"])),
                ("equilibriumDistance", 0.5 * (pa["equilibriumDistance"] + pb["equilibriumDistance"]))), [], []),
            _ => null,
        };
    }

    private static Confinement? ReadConfinement(Context c, JsonElement p, string path, double l)
    {
        Confinement? confinement = null;
        if (c.Object(p, "confinement", path) is { } conf)
        {
            const string cp = "$.landscape.confinement";
            string? shape = c.String(conf, "shape", cp, true, "sphere", "box");
            if (shape == "sphere")
            {
                c.CheckKeys(conf, cp, "shape", "radius");
                double? r = c.Number(conf, "radius", cp, true, ScenarioSchema.At("$defs/confinement/oneOf[shape=sphere]/properties/radius"));
                confinement = r is double rr ? new Confinement(ConfinementShape.Sphere, rr * l) : null;
            }
            else if (shape == "box")
            {
                c.CheckKeys(conf, cp, "shape", "halfWidth");
                double? h = c.Number(conf, "halfWidth", cp, true, ScenarioSchema.At("$defs/confinement/oneOf[shape=box]/properties/halfWidth"));
                confinement = h is double hh ? new Confinement(ConfinementShape.Box, hh * l) : null;
            }
        }
        return confinement;
    }

    /// <summary>Steps between swap attempts when a replica-exchange scenario gives none (docs/replica-exchange.md: what it costs).</summary>
    internal const int DefaultSwapInterval = 100;

    private static SamplingSettings? ReadSampling(Context c, JsonElement root)
    {
        if (c.Object(root, "sampling", "$") is not { } p)
        {
            return null;
        }
        const string path = "$.sampling";
        c.CheckKeys(p, path, "method", "chains", "samplesPerChain", "burnIn", "seed", "reweightTo", "ladder", "targetSwapAcceptance", "swapInterval");
        string method = c.String(p, "method", path, false, "metropolis", "direct", "replica-exchange") ?? "metropolis";
        bool replicas = method == "replica-exchange";
        long? swapInterval = c.Integer(p, "swapInterval", path, false, ScenarioSchema.At(Sampling + "swapInterval"));
        foreach (string key in new[] { "ladder", "targetSwapAcceptance", "swapInterval" })
        {
            if (!replicas && p.TryGetProperty(key, out _))
            {
                c.Add(path + "." + key, "applies only with \"method\": \"replica-exchange\".");
            }
        }
        long chains = c.Integer(p, "chains", path, false, ScenarioSchema.At(Sampling + "chains")) ?? 4;
        long samples = c.Integer(p, "samplesPerChain", path, false, ScenarioSchema.At(Sampling + "samplesPerChain")) ?? 100_000;
        long burnIn = c.Integer(p, "burnIn", path, false, ScenarioSchema.At(Sampling + "burnIn")) ?? 10_000;
        ulong seed = c.Seed(p, "seed", path) ?? 0;
        return new SamplingSettings
        {
            Seed = seed,
            Method = method == "direct" ? SamplingMethod.Direct : SamplingMethod.Metropolis,
            Chains = (int)chains,
            SamplesPerChain = samples,
            BurnIn = burnIn,
            SwapInterval = replicas ? (int)(swapInterval ?? DefaultSwapInterval) : null,
        };
    }
}
