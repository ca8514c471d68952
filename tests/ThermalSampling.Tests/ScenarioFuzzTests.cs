using System;
using System.Linq;
using System.Text;
using FsCheck;
using FsCheck.Fluent;
using FsCheck.Xunit;
using ThermalSampling.Cli;
using Xunit;

namespace ThermalSampling.Tests;

/// <summary>
/// Bounded, seeded fuzzing of the scenario reader inside the test suite: random byte-level and token-level mutations of a
/// valid scenario must either parse or be refused with a <see cref="ScenarioException"/>; never any other exception.
/// </summary>
public class ScenarioFuzzTests
{
    private const string Valid = """
        {
          "title": "fuzz seed (invented)",
          "units": { "energy": "meV", "length": "nm" },
          "mass": 39.9,
          "potential": { "form": "morse", "wellDepth": 343, "width": 13.6, "equilibriumDistance": 0.2866 },
          "landscape": { "kind": "sites", "lattice": "fcc", "nearestNeighbourDistance": 0.2556, "shells": 1, "confinement": { "shape": "sphere", "radius": 0.1 } },
          "temperatures": [100, 300],
          "sampling": { "method": "metropolis", "chains": 4, "samplesPerChain": 20000, "burnIn": 4000, "seed": 11 }
        }
        """;

    private static readonly string[] Tokens = { "null", "true", "-1", "0", "1e999", "-0", "\"\"", "[]", "{}", "NaN", "\"\\u0000\"", "1.7976931348623157e308", "\"fcc\"", ",", ":", "\"sites\"" };

    private static Arbitrary<byte[]> Mutants() =>
        (from seed in Gen.Choose(0, int.MaxValue)
         from count in Gen.Choose(1, 6)
         select Mutate(seed, count)).ToArbitrary();

    private static byte[] Mutate(int seed, int count)
    {
        var random = Randomness.RandomStream.FromSeed((ulong)seed);
        var text = new StringBuilder(Valid);
        for (int k = 0; k < count; k++)
        {
            int at = (int)(random.NextUnitInterval() * text.Length);
            switch ((int)(random.NextUnitInterval() * 4))
            {
                case 0:
                    text.Remove(at, Math.Min(1 + (int)(random.NextUnitInterval() * 8), text.Length - at));
                    break;
                case 1:
                    text.Insert(at, Tokens[(int)(random.NextUnitInterval() * Tokens.Length)]);
                    break;
                case 2:
                    text[at] = (char)(32 + (int)(random.NextUnitInterval() * 95));
                    break;
                default:
                    var bytes = Encoding.UTF8.GetBytes(text.ToString());
                    int b = (int)(random.NextUnitInterval() * bytes.Length);
                    bytes[b] = (byte)(random.NextUInt64() & 0xFF);
                    return bytes;
            }
        }
        return Encoding.UTF8.GetBytes(text.ToString());
    }

    [Property(MaxTest = 2000)]
    public Property Mutated_scenarios_parse_or_are_refused_with_a_scenario_error() => Prop.ForAll(Mutants(), bytes =>
    {
        try
        {
            var scenario = ScenarioReader.Read(bytes);
            return scenario.TemperaturesInKelvin.All(t => t > 0 && double.IsFinite(t)) && scenario.MassInAtomicMassUnits > 0;
        }
        catch (ScenarioException ex)
        {
            return ex.Problems.Count > 0 && ex.Problems.All(p => p.StartsWith("$", StringComparison.Ordinal));
        }
    });

    [Fact]
    public void The_unmutated_seed_is_valid()
        => Assert.Equal(2, ScenarioReader.Read(Encoding.UTF8.GetBytes(Valid)).TemperaturesInKelvin.Length);
}
