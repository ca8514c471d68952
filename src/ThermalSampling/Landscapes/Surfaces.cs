using System;
using System.Collections.Generic;
using System.Collections.Immutable;
using System.Globalization;
using System.Linq;
using ThermalSampling.Internal;
using ThermalSampling.Units;

namespace ThermalSampling.Landscapes;

/// <summary>The Miller indices (h k l) of a crystal plane of a cubic lattice, in the axes of the conventional cube.</summary>
/// <param name="H">h.</param>
/// <param name="K">k.</param>
/// <param name="L">l.</param>
public readonly record struct MillerIndices(int H, int K, int L)
{
    /// <summary>The plane written as crystallographers do, for example (111) or (1-10); indices beyond one digit are comma-separated.</summary>
    public override string ToString()
    {
        int[] v = [H, K, L];
        string sep = v.Any(x => Math.Abs(x) > 9) ? "," : "";
        return "(" + string.Join(sep, v.Select(x => x.ToString(CultureInfo.InvariantCulture))) + ")";
    }
}

/// <summary>Where above the surface net the adsorbed particle sits (the trade's names for adsorption sites).</summary>
public enum AdsorptionSiteKind
{
    /// <summary>Directly above a top-layer atom.</summary>
    Top,

    /// <summary>Above the midpoint between two nearest top-layer atoms.</summary>
    Bridge,

    /// <summary>
    /// Above the centre of the widest ring of top-layer atoms (four-fold on fcc(100)); refused where the facet has two kinds
    /// of hollow that differ by the layer beneath (the three-fold hollows of a close-packed facet): use <see cref="FccHollow"/>
    /// or <see cref="HcpHollow"/> there.
    /// </summary>
    Hollow,

    /// <summary>The three-fold hollow with a third-layer atom beneath it and none in the second layer (the site that continues fcc stacking).</summary>
    FccHollow,

    /// <summary>The three-fold hollow with a second-layer atom directly beneath it (the site that continues hcp stacking).</summary>
    HcpHollow,
}

/// <summary>
/// The frame a surface geometry is written in: the origin is a top-layer atom, the top layer lies in z = 0 with the crystal
/// at z &lt; 0 (vacuum above), x runs along the shortest lattice vector in the surface plane (the first in a fixed order
/// when several are equally short) and y completes a right-handed frame. Each axis is given in the conventional cubic
/// axes of the crystal, as a unit vector and as the smallest integer direction [u v w] along it.
/// </summary>
/// <param name="AxisX">The x axis in cubic axes (unit vector).</param>
/// <param name="AxisY">The y axis in cubic axes (unit vector).</param>
/// <param name="Normal">The z axis, the outward surface normal, in cubic axes (unit vector).</param>
/// <param name="LayerSpacingInAngstroms">The distance between neighbouring atomic layers parallel to the surface, Å.</param>
public sealed record SurfaceFrame(Position AxisX, Position AxisY, Position Normal, double LayerSpacingInAngstroms)
{
    /// <summary>One line: the origin, the axes as integer directions and the layer spacing.</summary>
    public string Description => string.Create(CultureInfo.InvariantCulture,
        $"origin at a top-layer atom; top layer in z = 0, crystal at z < 0; x along {Direction(AxisX)}, y along {Direction(AxisY)}, z along {Direction(Normal)} (outward); layer spacing {LayerSpacingInAngstroms:G6} Å");

    /// <summary>The smallest integer direction [u v w] parallel to <paramref name="unit"/> (to 1e-6), or the rounded components when there is none with entries up to 60.</summary>
    internal static string Direction(Position unit)
    {
        double[] v = [unit.X, unit.Y, unit.Z];
        double smallest = v.Where(x => Math.Abs(x) > 1e-9).Min(Math.Abs);
        for (int m = 1; m <= 60; m++)
        {
            var scaled = v.Select(x => x / smallest * m).ToArray();
            if (scaled.All(x => Math.Abs(x - Math.Round(x)) < 1e-6 * Math.Max(1, Math.Abs(x))))
            {
                var ints = scaled.Select(x => (long)Math.Round(x)).ToArray();
                long g = ints.Aggregate(0L, (acc, x) => Gcd(acc, Math.Abs(x)));
                return "[" + string.Join(" ", ints.Select(x => (x / g).ToString(CultureInfo.InvariantCulture))) + "]";
            }
        }
        return string.Create(CultureInfo.InvariantCulture, $"[{unit.X:F4} {unit.Y:F4} {unit.Z:F4}]");
    }

    internal static long Gcd(long a, long b) => b == 0 ? a : Gcd(b, a % b);
}

/// <summary>An adsorption geometry: the fixed substrate atoms, a start position for the adsorbate, and the frame they are written in.</summary>
public sealed record AdsorptionGeometry
{
    /// <summary>The fixed substrate atoms, Å, in <see cref="Frame"/> (top layer in z = 0).</summary>
    public required ImmutableArray<Position> Sites { get; init; }

    /// <summary>The adsorbate's start: above the chosen site, at the height where its nearest substrate atom is one nearest-neighbour distance away.</summary>
    public required Position Start { get; init; }

    /// <summary>The frame: origin, axes in the crystal and layer spacing.</summary>
    public required SurfaceFrame Frame { get; init; }

    /// <summary>The slab keeps every atom within this distance of the site, measured in the surface plane, Å.</summary>
    public required double LateralRadiusInAngstroms { get; init; }

    /// <summary>The substrate's nearest-neighbour distance, Å.</summary>
    public required double NearestNeighbourDistanceInAngstroms { get; init; }

    /// <summary>What the site is, in words (for example "fcc hollow of fcc(111): 3-fold, over a third-layer atom").</summary>
    public required string SiteDescription { get; init; }
}

/// <summary>Surface slabs of cubic lattices cut along any plane (h k l).</summary>
public static partial class LatticeSites
{
    private const int MaxMillerIndex = 6;

    /// <summary>
    /// A slab of a cubic crystal cut along the plane <paramref name="facet"/>, with the adsorption site <paramref name="site"/>
    /// above it, written in the frame of <see cref="AdsorptionGeometry.Frame"/>. The slab keeps the top
    /// <paramref name="layers"/> atomic layers parallel to the surface and every atom of them within
    /// <paramref name="lateralRadiusInNeighbourDistances"/> nearest-neighbour distances of the site, measured in the surface plane.
    /// Hollows are found from the top layer's net (the centres of the widest empty circles through three top-layer atoms
    /// next to the origin) and told apart by the first layer that has an atom beneath them.
    /// </summary>
    /// <param name="lattice">FaceCentredCubic, BodyCentredCubic or SimpleCubic (hcp surfaces are not built; give their sites explicitly).</param>
    /// <param name="facet">The Miller indices, each from −6 to 6, not all zero (a common factor is removed: (222) is (111)).</param>
    /// <param name="site">Top, bridge or a hollow.</param>
    /// <param name="nearestNeighbourDistance">The substrate's nearest-neighbour distance; must be positive.</param>
    /// <param name="layers">Number of substrate layers, 1 to 10.</param>
    /// <param name="lateralRadiusInNeighbourDistances">The in-plane radius of the slab in units of the nearest-neighbour distance, 1 to 20.</param>
    /// <exception cref="ArgumentException">When the facet has no site of the kind asked for, or two kinds of hollow and <see cref="AdsorptionSiteKind.Hollow"/> was asked for (the message names the kinds it has).</exception>
    public static AdsorptionGeometry Surface(LatticeKind lattice, MillerIndices facet, AdsorptionSiteKind site, Length nearestNeighbourDistance,
        int layers = 3, double lateralRadiusInNeighbourDistances = 4)
    {
        double nn = Preconditions.CheckPositive(nearestNeighbourDistance.InAngstroms, nameof(nearestNeighbourDistance));
        Preconditions.CheckRange(layers, 1, 10, nameof(layers));
        Preconditions.CheckRange(lateralRadiusInNeighbourDistances, 1, 20, nameof(lateralRadiusInNeighbourDistances));
        if (lattice is not (LatticeKind.FaceCentredCubic or LatticeKind.BodyCentredCubic or LatticeKind.SimpleCubic))
        {
            throw new ArgumentOutOfRangeException(nameof(lattice), lattice,
                "surfaces are built for the cubic lattices FaceCentredCubic, BodyCentredCubic and SimpleCubic; give the sites of other surfaces explicitly.");
        }
        if (!Enum.IsDefined(site))
        {
            throw new ArgumentOutOfRangeException(nameof(site), site, "site must be Top, Bridge, Hollow, FccHollow or HcpHollow.");
        }
        foreach (var (value, name) in new[] { (facet.H, "h"), (facet.K, "k"), (facet.L, "l") })
        {
            if (Math.Abs(value) > MaxMillerIndex)
            {
                throw new ArgumentOutOfRangeException(nameof(facet), facet,
                    $"Miller index {name} = {value} is out of range: each index must be from {-MaxMillerIndex} to {MaxMillerIndex}.");
            }
        }
        if (facet is { H: 0, K: 0, L: 0 })
        {
            throw new ArgumentException("facet (000) is not a plane: at least one Miller index must be non-zero.", nameof(facet));
        }
        long common = SurfaceFrame.Gcd(SurfaceFrame.Gcd(Math.Abs(facet.H), Math.Abs(facet.K)), Math.Abs(facet.L));
        facet = new MillerIndices((int)(facet.H / common), (int)(facet.K / common), (int)(facet.L / common));

        var (edge, basis) = CubicCell(lattice, nn);
        var normal = (1 / Math.Sqrt(facet.H * facet.H + facet.K * facet.K + facet.L * facet.L)) * new Position(facet.H, facet.K, facet.L);
        double tolerance = 1e-6 * nn;
        double radius = lateralRadiusInNeighbourDistances * nn;
        const int ExtraLayers = 3; // below the kept slab, for telling the hollows apart
        double depth = (layers + ExtraLayers) * edge; // every cubic layer spacing is at most the cube edge
        int extent = (int)Math.Ceiling((radius + depth + 2 * nn) / edge) + 1;

        // Every lattice point in reach, split into its height along the normal and its in-plane part.
        var points = new List<(Position P, double Height)>();
        for (int i = -extent; i <= extent; i++)
        {
            for (int j = -extent; j <= extent; j++)
            {
                for (int k = -extent; k <= extent; k++)
                {
                    foreach (var (bx, by, bz) in basis)
                    {
                        var p = new Position((i + bx) * edge, (j + by) * edge, (k + bz) * edge);
                        double h = Dot(p, normal);
                        if (h <= tolerance && h >= -depth)
                        {
                            points.Add((p, h));
                        }
                    }
                }
            }
        }
        var heights = new List<double>();
        foreach (double h in points.Select(t => t.Height).OrderByDescending(h => h))
        {
            if (heights.Count == 0 || heights[^1] - h > tolerance)
            {
                heights.Add(h);
            }
        }
        int LayerOf(double h) => heights.FindIndex(x => Math.Abs(x - h) <= tolerance);

        // x along the shortest in-plane lattice vector: first in descending (x, y, z) order of the cubic axes when several tie.
        var inPlane = points.Where(t => Math.Abs(t.Height) <= tolerance && t.P.Norm > tolerance).Select(t => t.P).ToList();
        double shortest = inPlane.Min(p => p.Norm);
        var along = inPlane.Where(p => p.Norm <= shortest + tolerance)
            .OrderByDescending(p => Math.Round(p.X / tolerance)).ThenByDescending(p => Math.Round(p.Y / tolerance)).ThenByDescending(p => Math.Round(p.Z / tolerance))
            .First();
        var axisX = (1 / along.Norm) * along;
        var axisY = Cross(normal, axisX);
        var frame = new SurfaceFrame(axisX, axisY, normal, heights.Count > 1 ? heights[0] - heights[1] : edge);
        double Snap(double v) => Math.Abs(v) < tolerance * 1e-3 ? 0.0 : v; // no −0 or 1e-16 residues from the rotation
        Position ToFrame(Position p) => new(Snap(Dot(p, axisX)), Snap(Dot(p, axisY)), Snap(Dot(p, normal)));
        var layered = points.Select(t => (Q: ToFrame(t.P), Layer: LayerOf(t.Height))).ToList();
        var top = layered.Where(t => t.Layer == 0).Select(t => t.Q).ToList();

        var (lateral, description) = site switch
        {
            AdsorptionSiteKind.Top => (new Position(0, 0, 0), $"top site of {Name(lattice)}{facet}: above a top-layer atom"),
            AdsorptionSiteKind.Bridge => (new Position(shortest / 2, 0, 0), $"bridge site of {Name(lattice)}{facet}: above the midpoint of two nearest top-layer atoms"),
            _ => Hollow(lattice, facet, site, top, layered, tolerance),
        };

        var sites = ImmutableArray.CreateBuilder<Position>();
        foreach (var (q, layer) in layered)
        {
            double dx = q.X - lateral.X, dy = q.Y - lateral.Y;
            if (layer < layers && dx * dx + dy * dy <= (radius + tolerance) * (radius + tolerance)) // atoms on the rim all in or all out, so the site keeps its symmetry
            {
                sites.Add(q);
            }
        }
        var slab = sites.ToImmutable();
        return new AdsorptionGeometry
        {
            Sites = slab,
            Start = StartAbove(slab, lateral, nn),
            Frame = frame,
            SiteDescription = description,
            LateralRadiusInAngstroms = radius,
            NearestNeighbourDistanceInAngstroms = nn,
        };
    }

    /// <summary>The hollow of the kind asked for: among the widest empty circles through the origin and two top-layer neighbours.</summary>
    private static (Position Lateral, string Description) Hollow(LatticeKind lattice, MillerIndices facet, AdsorptionSiteKind site, List<Position> top,
        List<(Position Q, int Layer)> layered, double tolerance)
    {
        var near = top.Where(q => q.X * q.X + q.Y * q.Y > tolerance * tolerance).OrderBy(q => q.X * q.X + q.Y * q.Y).Take(24).ToList();
        var candidates = new List<(Position Centre, double Radius)>();
        for (int a = 0; a < near.Count; a++)
        {
            for (int b = a + 1; b < near.Count; b++)
            {
                if (Circumcentre(near[a], near[b]) is not { } c)
                {
                    continue;
                }
                double rho = Math.Sqrt(c.X * c.X + c.Y * c.Y);
                bool empty = top.All(q => Math.Sqrt((q.X - c.X) * (q.X - c.X) + (q.Y - c.Y) * (q.Y - c.Y)) >= rho - tolerance);
                if (empty && !candidates.Any(t => Math.Abs(t.Centre.X - c.X) <= tolerance && Math.Abs(t.Centre.Y - c.Y) <= tolerance))
                {
                    candidates.Add((c, rho));
                }
            }
        }
        double widest = candidates.Max(t => t.Radius);
        int Ring(Position c) => top.Count(q => Math.Abs(Math.Sqrt((q.X - c.X) * (q.X - c.X) + (q.Y - c.Y) * (q.Y - c.Y)) - widest) <= tolerance);
        int Beneath(Position c) // the first layer below the top with an atom directly under c; 0 when none within reach
            => layered.Where(t => t.Layer > 0 && Math.Abs(t.Q.X - c.X) <= tolerance && Math.Abs(t.Q.Y - c.Y) <= tolerance)
                .Select(t => t.Layer).DefaultIfEmpty(0).Min();
        var kinds = candidates.Where(t => t.Radius >= widest - tolerance)
            .Select(t => (t.Centre, Beneath: Beneath(t.Centre)))
            .GroupBy(t => t.Beneath)
            .OrderBy(g => g.Key)
            .ToList();
        string Under(int layer) => layer switch
        {
            0 => "with no atom beneath it in the next few layers",
            1 => "over a second-layer atom",
            2 => "over a third-layer atom",
            _ => $"over an atom of layer {layer + 1}",
        };
        string what = $"{Name(lattice)}{facet}";
        int wanted = site switch { AdsorptionSiteKind.FccHollow => 2, AdsorptionSiteKind.HcpHollow => 1, _ => -1 };
        IGrouping<int, (Position Centre, int Beneath)> chosen;
        if (wanted < 0)
        {
            if (kinds.Count > 1)
            {
                throw new ArgumentException(
                    $"{what} has {kinds.Count} kinds of hollow ({string.Join("; ", kinds.Select(g => Under(g.Key)))}): ask for FccHollow (over a third-layer atom) or HcpHollow (over a second-layer atom).",
                    nameof(site));
            }
            chosen = kinds[0];
        }
        else
        {
            chosen = kinds.Count == 2 ? kinds.FirstOrDefault(g => g.Key == wanted)! : null!;
            if (chosen is null)
            {
                throw new ArgumentException(
                    $"{what} has no {(wanted == 2 ? "fcc" : "hcp")} hollow: its widest hollows are {string.Join("; ", kinds.Select(g => Under(g.Key)))}. FccHollow and HcpHollow name the two three-fold hollows of a close-packed facet; use Hollow here.",
                    nameof(site));
            }
        }
        var centre = chosen.Select(t => t.Centre)
            .OrderBy(c => Math.Round((c.X * c.X + c.Y * c.Y) / (tolerance * tolerance)))
            .ThenBy(c => Math.Round((Math.Atan2(c.Y, c.X) + 2 * Math.PI) % (2 * Math.PI), 9))
            .First();
        string name = site switch { AdsorptionSiteKind.FccHollow => "fcc hollow", AdsorptionSiteKind.HcpHollow => "hcp hollow", _ => "hollow" };
        return (centre, $"{name} of {what}: {Ring(centre)}-fold, {Under(chosen.Key)}");
    }

    /// <summary>The centre of the circle through the origin, <paramref name="a"/> and <paramref name="b"/> in the xy plane; null when they are collinear.</summary>
    private static Position? Circumcentre(Position a, Position b)
    {
        double d = 2 * (a.X * b.Y - a.Y * b.X);
        double scale = (a.X * a.X + a.Y * a.Y) * (b.X * b.X + b.Y * b.Y);
        if (Math.Abs(d) <= 1e-9 * Math.Sqrt(scale))
        {
            return null;
        }
        double a2 = a.X * a.X + a.Y * a.Y, b2 = b.X * b.X + b.Y * b.Y;
        return new Position((b.Y * a2 - a.Y * b2) / d, (a.X * b2 - b.X * a2) / d, 0);
    }

    /// <summary>Above <paramref name="lateral"/> at the height where the nearest slab atom is <paramref name="nn"/> away (0 when even the plane leaves more room).</summary>
    private static Position StartAbove(ImmutableArray<Position> slab, Position lateral, double nn)
    {
        double Nearest(double h) => slab.Min(q => (q - new Position(lateral.X, lateral.Y, h)).Norm);
        if (Nearest(0) >= nn)
        {
            return new Position(lateral.X, lateral.Y, 0);
        }
        double lo = 0, hi = nn; // the nearest distance grows with the height above the top layer, and is at least nn at height nn
        for (int i = 0; i < 200 && hi - lo > 1e-13 * nn; i++)
        {
            double mid = 0.5 * (lo + hi);
            (lo, hi) = Nearest(mid) < nn ? (mid, hi) : (lo, mid);
        }
        return new Position(lateral.X, lateral.Y, 0.5 * (lo + hi));
    }

    private static string Name(LatticeKind lattice) => lattice switch
    {
        LatticeKind.FaceCentredCubic => "fcc",
        LatticeKind.BodyCentredCubic => "bcc",
        _ => "sc",
    };

    private static double Dot(Position a, Position b) => a.X * b.X + a.Y * b.Y + a.Z * b.Z;

    private static Position Cross(Position a, Position b) => new(a.Y * b.Z - a.Z * b.Y, a.Z * b.X - a.X * b.Z, a.X * b.Y - a.Y * b.X);
}
