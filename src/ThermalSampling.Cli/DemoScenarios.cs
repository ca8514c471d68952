using System.Text;

namespace ThermalSampling.Cli;

/// <summary>
/// The built-in scenarios of <c>demo</c>. Both are invented for illustration, not data (round, made-up values): an
/// adatom of 40 u bound by Lennard-Jones pairs with a 100 meV well at 3.4 Å, at the fcc hollow of an invented fcc(111)
/// surface with a 3.4 Å nearest-neighbour distance, confined to 0.9 Å around the site (less than half the 1.96 Å between
/// neighbouring hollows), and the same atom held by a single partner on a line. Bound firmly enough that the coldest
/// temperature has no wall or escape warning; the warmer ones show what the warnings say.
/// </summary>
internal static class DemoScenarios
{
    internal const string SurfaceHollow = """
        {
          "title": "Invented demo: an adatom of 40 u at the fcc hollow of an invented fcc(111) surface (made-up Lennard-Jones pairs)",
          "units": { "energy": "meV", "length": "angstrom" },
          "mass": 40,
          "potential": { "form": "lennard-jones", "wellDepth": 100.0, "equilibriumDistance": 3.4 },
          "landscape": { "kind": "sites", "lattice": "fcc", "facet": [1, 1, 1], "adsorptionSite": "fcc-hollow", "nearestNeighbourDistance": 3.4, "layers": 3,
                         "confinement": { "shape": "sphere", "radius": 0.9 } },
          "temperatures": [10, 60, 200],
          "sampling": { "method": "metropolis", "chains": 4, "samplesPerChain": 40000, "burnIn": 4000, "seed": 2026 }
        }
        """;

    internal const string LinePair = """
        {
          "title": "Invented demo: the same atom held by one Lennard-Jones partner on a line",
          "units": { "energy": "meV", "length": "angstrom" },
          "mass": 40,
          "potential": { "form": "lennard-jones", "wellDepth": 100.0, "equilibriumDistance": 3.4 },
          "landscape": { "kind": "line", "window": [2.9, 6.0] },
          "temperatures": [10, 60, 200],
          "sampling": { "method": "metropolis", "chains": 4, "samplesPerChain": 100000, "burnIn": 10000, "seed": 2026 }
        }
        """;

    /// <summary>The base names of the figure files, in the order of <see cref="All"/>.</summary>
    internal static readonly string[] FigureNames = { "line-pair", "surface-hollow" };

    internal static Scenario[] All() => new[]
    {
        ScenarioReader.Read(Encoding.UTF8.GetBytes(LinePair)),
        ScenarioReader.Read(Encoding.UTF8.GetBytes(SurfaceHollow)),
    };
}
