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

/// <summary>
/// Builders of plain site lists: neighbour cages in bulk lattices and slabs under adsorption sites.
/// The lists are ordinary arrays that users may edit before building a landscape.
/// </summary>
public static partial class LatticeSites
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
            case LatticeKind.FaceCentredCubic or LatticeKind.BodyCentredCubic or LatticeKind.SimpleCubic:
                var (a, basis) = CubicCell(lattice, nn);
                AddCubic(points, a, extent, basis);
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

    /// <summary>The conventional cube edge and the basis (fractions of it) of a cubic lattice with nearest-neighbour distance <paramref name="nn"/>.</summary>
    private static (double Edge, (double, double, double)[] Basis) CubicCell(LatticeKind lattice, double nn) => lattice switch
    {
        LatticeKind.FaceCentredCubic => (nn * Math.Sqrt(2), [(0.0, 0.0, 0.0), (0.5, 0.5, 0.0), (0.5, 0.0, 0.5), (0.0, 0.5, 0.5)]),
        LatticeKind.BodyCentredCubic => (2 * nn / Math.Sqrt(3), [(0.0, 0.0, 0.0), (0.5, 0.5, 0.5)]),
        _ => (nn, [(0.0, 0.0, 0.0)]),
    };

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
}
