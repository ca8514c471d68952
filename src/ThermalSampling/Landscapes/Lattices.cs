using System;
using System.Collections.Generic;
using System.Collections.Immutable;
using System.Linq;
using ThermalSampling.Internal;
using ThermalSampling.Units;

namespace ThermalSampling.Landscapes;

/// <summary>Bulk lattices for which neighbour cages can be built.</summary>
public enum LatticeKind
{
    /// <summary>Face-centred cubic (12 nearest neighbours).</summary>
    FaceCentredCubic,

    /// <summary>Body-centred cubic (8 nearest neighbours).</summary>
    BodyCentredCubic,

    /// <summary>Simple cubic (6 nearest neighbours).</summary>
    SimpleCubic,

    /// <summary>Ideal hexagonal close-packed, c/a = √(8/3) (12 nearest neighbours).</summary>
    HexagonalClosePacked,
}

/// <summary>Surface facets for which adsorption sites can be built.</summary>
public enum SurfaceFacet
{
    /// <summary>The (100) face of an fcc crystal: a square net.</summary>
    Fcc100,

    /// <summary>The (111) face of an fcc crystal: a triangular net.</summary>
    Fcc111,
}

/// <summary>Where above the surface net the adsorbed particle sits.</summary>
public enum AdsorptionSiteKind
{
    /// <summary>Directly above a surface atom.</summary>
    Top,

    /// <summary>Above the midpoint between two neighbouring surface atoms.</summary>
    Bridge,

    /// <summary>Above the centre of the smallest ring of surface atoms (four on (100); on (111) the fcc hollow, above a third-layer atom).</summary>
    Hollow,
}

/// <summary>An adsorption geometry: the fixed surface atoms and a start position for the adsorbate.</summary>
/// <param name="Sites">The fixed substrate atoms, Å; the top layer lies in the plane z = 0.</param>
/// <param name="Start">The adsorbate's start: above the chosen site at the height where its distance to the nearest surface atoms equals the nearest-neighbour distance.</param>
public sealed record AdsorptionGeometry(ImmutableArray<Position> Sites, Position Start);

/// <summary>
/// Builders of plain site lists: neighbour cages in bulk lattices and slabs under adsorption sites.
/// The lists are ordinary arrays that users may edit before building a landscape.
/// </summary>
public static class LatticeSites
{
    private const double ShellTolerance = 1e-6;

    /// <summary>
    /// The atoms of the first <paramref name="shells"/> neighbour shells around a lattice atom at the
    /// origin (the origin itself excluded), sorted by distance.
    /// </summary>
    /// <param name="lattice">The lattice.</param>
    /// <param name="nearestNeighbourDistance">The nearest-neighbour distance; must be positive.</param>
    /// <param name="shells">How many shells, 1 to 10.</param>
    public static ImmutableArray<Position> NeighbourCage(LatticeKind lattice, Length nearestNeighbourDistance, int shells = 1)
    {
        double nn = Preconditions.CheckPositive(nearestNeighbourDistance.InAngstroms, nameof(nearestNeighbourDistance));
        Preconditions.CheckRange(shells, 1, 10, nameof(shells));
        var points = new List<Position>();
        int extent = 6;
        switch (lattice)
        {
            case LatticeKind.FaceCentredCubic:
                AddCubic(points, nn * Math.Sqrt(2), extent, new[] { (0.0, 0.0, 0.0), (0.5, 0.5, 0.0), (0.5, 0.0, 0.5), (0.0, 0.5, 0.5) });
                break;
            case LatticeKind.BodyCentredCubic:
                AddCubic(points, 2 * nn / Math.Sqrt(3), extent, new[] { (0.0, 0.0, 0.0), (0.5, 0.5, 0.5) });
                break;
            case LatticeKind.SimpleCubic:
                AddCubic(points, nn, extent, new[] { (0.0, 0.0, 0.0) });
                break;
            case LatticeKind.HexagonalClosePacked:
                AddHcp(points, nn, extent);
                break;
            default:
                throw new ArgumentOutOfRangeException(nameof(lattice), lattice, "lattice must be one of FaceCentredCubic, BodyCentredCubic, SimpleCubic, HexagonalClosePacked.");
        }
        var withDistance = points.Select(p => (p, d: p.Norm)).Where(t => t.d > ShellTolerance * nn).OrderBy(t => t.d).ToList();
        var result = ImmutableArray.CreateBuilder<Position>();
        int shell = 0;
        double current = -1;
        foreach (var (p, d) in withDistance)
        {
            if (d > current + ShellTolerance * nn)
            {
                shell++;
                current = d;
                if (shell > shells)
                {
                    break;
                }
            }
            result.Add(p);
        }
        return result.ToImmutable();
    }

    private static void AddCubic(List<Position> points, double a, int extent, (double, double, double)[] basis)
    {
        for (int i = -extent; i <= extent; i++)
        {
            for (int j = -extent; j <= extent; j++)
            {
                for (int k = -extent; k <= extent; k++)
                {
                    foreach (var (bx, by, bz) in basis)
                    {
                        points.Add(new Position((i + bx) * a, (j + by) * a, (k + bz) * a));
                    }
                }
            }
        }
    }

    private static void AddHcp(List<Position> points, double a, int extent)
    {
        double c = a * Math.Sqrt(8.0 / 3.0);
        var a1 = new Position(a, 0, 0);
        var a2 = new Position(a / 2, a * Math.Sqrt(3) / 2, 0);
        var a3 = new Position(0, 0, c);
        var second = (1.0 / 3.0) * (a1 + a2) + 0.5 * a3; // a1, a2 at 60°: the B site sits over the centre of a triangle
        for (int i = -extent; i <= extent; i++)
        {
            for (int j = -extent; j <= extent; j++)
            {
                for (int k = -extent / 2; k <= extent / 2; k++)
                {
                    var p = (double)i * a1 + (double)j * a2 + (double)k * a3;
                    points.Add(p);
                    points.Add(p + second);
                }
            }
        }
    }

    /// <summary>
    /// A slab of an fcc crystal with the adsorption site above it. The top layer lies in z = 0 and
    /// deeper layers at negative z; the slab keeps every atom within <paramref name="lateralRadiusInNeighbourDistances"/>
    /// nearest-neighbour distances of the site, measured in the surface plane.
    /// </summary>
    /// <param name="facet">(100) or (111).</param>
    /// <param name="site">Top, bridge or hollow.</param>
    /// <param name="nearestNeighbourDistance">The substrate's nearest-neighbour distance; must be positive.</param>
    /// <param name="layers">Number of substrate layers, 1 to 10.</param>
    /// <param name="lateralRadiusInNeighbourDistances">The in-plane radius of the slab in units of the nearest-neighbour distance, 1 to 20.</param>
    public static AdsorptionGeometry FccSurface(SurfaceFacet facet, AdsorptionSiteKind site, Length nearestNeighbourDistance,
        int layers = 3, double lateralRadiusInNeighbourDistances = 4)
    {
        double nn = Preconditions.CheckPositive(nearestNeighbourDistance.InAngstroms, nameof(nearestNeighbourDistance));
        Preconditions.CheckRange(layers, 1, 10, nameof(layers));
        Preconditions.CheckRange(lateralRadiusInNeighbourDistances, 1, 20, nameof(lateralRadiusInNeighbourDistances));
        if (!Enum.IsDefined(site))
        {
            throw new ArgumentOutOfRangeException(nameof(site), site, "site must be Top, Bridge or Hollow.");
        }
        Position e1, e2, layerShift;
        double spacing;
        switch (facet)
        {
            case SurfaceFacet.Fcc100:
                e1 = new Position(nn, 0, 0);
                e2 = new Position(0, nn, 0);
                layerShift = new Position(nn / 2, nn / 2, 0);
                spacing = nn / Math.Sqrt(2);
                break;
            case SurfaceFacet.Fcc111:
                e1 = new Position(nn, 0, 0);
                e2 = new Position(nn / 2, nn * Math.Sqrt(3) / 2, 0);
                layerShift = new Position(nn / 2, nn * Math.Sqrt(3) / 6, 0); // ABC stacking: each layer shifted by (e1 + e2)/3
                spacing = nn * Math.Sqrt(2.0 / 3.0);
                break;
            default:
                throw new ArgumentOutOfRangeException(nameof(facet), facet, "facet must be Fcc100 or Fcc111.");
        }

        // Lateral position of the site relative to the surface atom at the origin, and its lateral distance to the nearest surface atoms.
        Position lateral;
        double lateralDistance;
        switch (site)
        {
            case AdsorptionSiteKind.Top:
                lateral = Position.Origin;
                lateralDistance = 0;
                break;
            case AdsorptionSiteKind.Bridge:
                lateral = 0.5 * e1;
                lateralDistance = nn / 2;
                break;
            default:
                if (facet == SurfaceFacet.Fcc100)
                {
                    lateral = 0.5 * (e1 + e2);
                    lateralDistance = nn / Math.Sqrt(2);
                }
                else
                {
                    // fcc hollow: above a third-layer atom. Layer L is shifted by −L·s with s = (e1 + e2)/3,
                    // so the third layer (L = 2) sits at −2s ≡ +s modulo the surface net; the second layer (the hcp hollow) at −s.
                    lateral = (1.0 / 3.0) * (e1 + e2);
                    lateralDistance = nn / Math.Sqrt(3);
                }
                break;
        }
        double height = Math.Sqrt(nn * nn - lateralDistance * lateralDistance);
        double radius = lateralRadiusInNeighbourDistances * nn;
        int extent = (int)Math.Ceiling(lateralRadiusInNeighbourDistances * 2) + 3;
        var sites = ImmutableArray.CreateBuilder<Position>();
        for (int layer = 0; layer < layers; layer++)
        {
            // Layer L is shifted by −L·layerShift (so the layer below the top is under the hcp/fcc hollows as stacking requires).
            var shift = (double)(-layer % (facet == SurfaceFacet.Fcc100 ? 2 : 3)) * layerShift;
            for (int i = -extent; i <= extent; i++)
            {
                for (int j = -extent; j <= extent; j++)
                {
                    var p = (double)i * e1 + (double)j * e2 + shift;
                    double dx = p.X - lateral.X, dy = p.Y - lateral.Y;
                    if (dx * dx + dy * dy <= radius * radius)
                    {
                        sites.Add(new Position(p.X, p.Y, -layer * spacing));
                    }
                }
            }
        }
        return new AdsorptionGeometry(sites.ToImmutable(), new Position(lateral.X, lateral.Y, height));
    }
}
