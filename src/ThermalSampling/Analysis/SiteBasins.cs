using System;
using System.Collections.Generic;
using System.Collections.Immutable;
using System.Globalization;
using System.Linq;
using System.Runtime.CompilerServices;
using System.Threading.Tasks;
using MathNet.Numerics.LinearAlgebra;
using MathNet.Numerics.Optimization;
using ThermalSampling.Internal;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Units;

namespace ThermalSampling.Analysis;

/// <summary>Another local minimum found inside the confinement.</summary>
/// <param name="Position">Where it is, Å.</param>
/// <param name="EnergyAboveSiteInElectronVolts">Its energy minus the site minimum's, eV (negative when deeper).</param>
/// <param name="HarmonicWeight">Its harmonic partition-function weight relative to the site's, e^(−ΔE/kT)·√(det H_site / det H), at the temperature of <see cref="SiteBasin.OutsidePopulation"/>; null until a temperature is given.</param>
public sealed record OtherMinimum(Position Position, double EnergyAboveSiteInElectronVolts, double? HarmonicWeight = null);

/// <summary>The pass between two neighbouring basins: the lowest over neighbouring grid points of the higher of their energies, above the site's minimum (a minimum-energy-path estimate at the grid's spacing).</summary>
/// <param name="From">The lower basin index (0 the site's, 1 … K the other minima in order, K + 1 the wall's).</param>
/// <param name="To">The higher basin index.</param>
/// <param name="PassAboveSiteInElectronVolts">The pass energy above the site's minimum, eV.</param>
public sealed record BasinPass(int From, int To, double PassAboveSiteInElectronVolts);

/// <summary>
/// The basin of attraction of a site's minimum inside its confinement: the points from which steepest descent on the energy
/// ends at the site's minimum. Mapped on a grid across the confinement (each grid point descends to its lowest neighbour
/// among 26), so every number is a grid estimate with the spacing <see cref="GridSpacingInAngstroms"/>. A particle whose
/// draws lie outside this basin is not vibrating at its site, and its spread is not a displacement of the site.
/// </summary>
public sealed record SiteBasin
{
    /// <summary>The site's minimum, Å.</summary>
    public required Position Minimum { get; init; }

    /// <summary>The lowest pass out of the basin into the basin of another minimum, eV above the site minimum; null when no other minimum lies inside the confinement.</summary>
    public required double? BarrierToNeighbourInElectronVolts { get; init; }

    /// <summary>The minimum on the far side of that pass, Å; null with it.</summary>
    public required Position? NeighbourMinimum { get; init; }

    /// <summary>The lowest energy at which the basin (or a basin that slides into the wall) meets the confinement wall, eV above the site minimum; +∞ when it does not reach the wall.</summary>
    public required double RiseToWallInElectronVolts { get; init; }

    /// <summary>The other local minima found inside the confinement (true minima, not points where the energy runs down into the wall).</summary>
    public required ImmutableArray<OtherMinimum> OtherMinima { get; init; }

    /// <summary>Every point closer to the minimum than this is inside the basin, Å.</summary>
    public required double InscribedRadiusInAngstroms { get; init; }

    /// <summary>Every point farther from the minimum than this is outside the basin, Å.</summary>
    public required double OuterRadiusInAngstroms { get; init; }

    /// <summary>The grid spacing of the map, Å: the resolution of every number here.</summary>
    public required double GridSpacingInAngstroms { get; init; }

    /// <summary>The lowest way out of the basin: the smaller of the barrier to a neighbour and the rise to the wall, eV.</summary>
    public double LowestWayOutInElectronVolts => Math.Min(BarrierToNeighbourInElectronVolts ?? double.PositiveInfinity, RiseToWallInElectronVolts);

    /// <summary>Whether the lowest way out leads to another minimum (rather than to the confinement wall).</summary>
    public bool WayOutLeadsToAnotherMinimum => BarrierToNeighbourInElectronVolts is double b && b <= RiseToWallInElectronVolts;

    /// <summary>
    /// The harmonic-superposition estimate of the probability of being in the basin of another minimum at the temperature the
    /// weights were computed for (Σ weights of the others over 1 + Σ); 0 when no other minimum was found, null until a
    /// temperature is given (<see cref="SiteBasins.AtTemperature"/>).
    /// </summary>
    public double? OutsidePopulation { get; init; }
}

/// <summary>Maps the basin of a site's minimum (see <see cref="SiteBasin"/>).</summary>
public static class SiteBasins
{
    private const int MinimumPointsPerAxis = 25, MaximumPointsPerAxis = 81;
    private const double TargetSpacingInAngstroms = 0.1;
    private const double MaximumPairEvaluations = 3e8;
    private static readonly ConditionalWeakTable<object, Tuple<SiteBasin, BasinGrid>> Cache = new();

    /// <summary>
    /// Maps the basin of <paramref name="minimum"/> (the site's minimum, for example <see cref="SiteHarmonicEstimate.Minimum"/>)
    /// inside the confinement of <paramref name="landscape"/>. The map depends only on the landscape, so it is computed
    /// once per landscape and minimum and reused.
    /// </summary>
    /// <typeparam name="TPotential">The potential type.</typeparam>
    /// <param name="landscape">The landscape.</param>
    /// <param name="minimum">The site's minimum; must lie inside the confinement.</param>
    public static SiteBasin Map<TPotential>(SiteLandscape<TPotential> landscape, Position minimum)
        where TPotential : struct, IPairPotential
    {
        Preconditions.CheckNotNull(landscape, nameof(landscape));
        if (!landscape.Contains(minimum))
        {
            throw new ArgumentOutOfRangeException(nameof(minimum), minimum, $"minimum = {minimum} lies outside the confinement; the basin of a site is mapped inside it.");
        }
        return MapWithGrid(landscape, minimum).Basin;
    }

    /// <summary>The basin and its grid (which grid points lie outside it), computed once per landscape and minimum.</summary>
    internal static (SiteBasin Basin, BasinGrid Grid) MapWithGrid<TPotential>(SiteLandscape<TPotential> landscape, Position minimum)
        where TPotential : struct, IPairPotential
    {
        lock (Cache)
        {
            if (Cache.TryGetValue(landscape, out var cached) && cached.Item1.Minimum == minimum)
            {
                return (cached.Item1, cached.Item2);
            }
        }
        var computed = Compute(landscape, minimum);
        lock (Cache)
        {
            Cache.AddOrUpdate(landscape, Tuple.Create(computed.Item1, computed.Item2));
        }
        return computed;
    }

    /// <summary>
    /// The same basin with the harmonic weights of the other minima and <see cref="SiteBasin.OutsidePopulation"/> at
    /// <paramref name="temperature"/> (harmonic superposition: each minimum counts e^(−E/kT)/√det H).
    /// </summary>
    /// <typeparam name="TPotential">The potential type.</typeparam>
    /// <param name="basin">The basin from <see cref="Map"/>.</param>
    /// <param name="landscape">The landscape it was mapped on.</param>
    /// <param name="temperature">The temperature.</param>
    public static SiteBasin AtTemperature<TPotential>(SiteBasin basin, SiteLandscape<TPotential> landscape, Temperature temperature)
        where TPotential : struct, IPairPotential
    {
        Preconditions.CheckNotNull(basin, nameof(basin));
        Preconditions.CheckNotNull(landscape, nameof(landscape));
        double kt = temperature.ThermalEnergyInElectronVolts;
        double siteDet = landscape.Hessian(basin.Minimum).Determinant();
        var others = ImmutableArray.CreateBuilder<OtherMinimum>(basin.OtherMinima.Length);
        double sum = 0;
        foreach (var m in basin.OtherMinima)
        {
            double det = landscape.Hessian(m.Position).Determinant();
            double weight = det > 0 && siteDet > 0 ? Math.Exp(-m.EnergyAboveSiteInElectronVolts / kt) * Math.Sqrt(siteDet / det) : 0;
            sum += weight;
            others.Add(m with { HarmonicWeight = weight });
        }
        double outside = double.IsPositiveInfinity(sum) ? 1 : sum / (1 + sum);
        return basin with { OtherMinima = others.MoveToImmutable(), OutsidePopulation = outside };
    }

    private static (SiteBasin, BasinGrid) Compute<TPotential>(SiteLandscape<TPotential> landscape, Position minimum)
        where TPotential : struct, IPairPotential
    {
        var confinement = landscape.Confinement;
        var centre = landscape.Centre;
        double size = confinement.SizeInAngstroms;
        int n = (int)Math.Clamp(Math.Ceiling(2 * size / TargetSpacingInAngstroms) + 1, MinimumPointsPerAxis, MaximumPointsPerAxis);
        while (n > MinimumPointsPerAxis && (double)n * n * n * landscape.Sites.Length > MaximumPairEvaluations)
        {
            n -= 2;
        }
        double h = 2 * size / (n - 1);
        Position At(int i, int j, int k) => new(centre.X - size + i * h, centre.Y - size + j * h, centre.Z - size + k * h);
        int Index(int i, int j, int k) => (k * n + j) * n + i;

        var energy = new double[n * n * n];
        var inside = new bool[n * n * n];
        Parallel.For(0, n, k => // each slice writes only its own cells, so the map is the same for any thread count
        {
            for (int j = 0; j < n; j++)
            {
                for (int i = 0; i < n; i++)
                {
                    var p = At(i, j, k);
                    int c = Index(i, j, k);
                    inside[c] = landscape.Contains(p);
                    energy[c] = inside[c] ? landscape.Energy(p) : double.PositiveInfinity;
                }
            }
        });

        // Steepest descent on the grid: each inside point points to its lowest inside neighbour when that is lower.
        var next = new int[energy.Length];
        var atWall = new bool[energy.Length];
        for (int k = 0; k < n; k++)
        {
            for (int j = 0; j < n; j++)
            {
                for (int i = 0; i < n; i++)
                {
                    int c = Index(i, j, k);
                    next[c] = c;
                    if (!inside[c])
                    {
                        continue;
                    }
                    double lowest = energy[c];
                    foreach (int d in Neighbours(i, j, k, n))
                    {
                        if (!inside[d])
                        {
                            atWall[c] = true;
                        }
                        else if (energy[d] < lowest) // strictly lower, first in the fixed neighbour order: the same map every time
                        {
                            lowest = energy[d];
                            next[c] = d;
                        }
                    }
                    if (i == 0 || j == 0 || k == 0 || i == n - 1 || j == n - 1 || k == n - 1)
                    {
                        atWall[c] = true;
                    }
                }
            }
        }
        var sink = new int[energy.Length];
        for (int c = 0; c < sink.Length; c++)
        {
            sink[c] = -1;
        }
        int Sink(int c)
        {
            var path = new List<int>();
            while (sink[c] < 0 && next[c] != c)
            {
                path.Add(c);
                c = next[c];
            }
            int s = sink[c] >= 0 ? sink[c] : c;
            sink[c] = s;
            foreach (int p in path)
            {
                sink[p] = s;
            }
            return s;
        }
        for (int c = 0; c < sink.Length; c++)
        {
            if (inside[c])
            {
                Sink(c);
            }
        }

        int nearest = Index(Math.Clamp((int)Math.Round((minimum.X - centre.X + size) / h), 0, n - 1),
            Math.Clamp((int)Math.Round((minimum.Y - centre.Y + size) / h), 0, n - 1),
            Math.Clamp((int)Math.Round((minimum.Z - centre.Z + size) / h), 0, n - 1));
        if (!inside[nearest])
        {
            nearest = Enumerable.Range(0, energy.Length).Where(c => inside[c]).MinBy(c => (Position(c) - minimum).Norm);
        }
        Position Position(int c) => At(c % n, c / n % n, c / (n * n));
        int site = sink[nearest];
        double siteEnergy = landscape.Energy(minimum);

        // Passes out of the basin, the wall, and the radii.
        double barrier = double.PositiveInfinity, wall = double.PositiveInfinity, wallViaOther = double.PositiveInfinity;
        int neighbourSink = -1, wallCell = -1;
        double inscribed = double.PositiveInfinity, outer = 0;
        for (int k = 0; k < n; k++)
        {
            for (int j = 0; j < n; j++)
            {
                for (int i = 0; i < n; i++)
                {
                    int c = Index(i, j, k);
                    double r = (At(i, j, k) - minimum).Norm;
                    if (!inside[c] || sink[c] != site)
                    {
                        inscribed = Math.Min(inscribed, r);
                        continue;
                    }
                    outer = Math.Max(outer, r);
                    if (atWall[c] && energy[c] < wall)
                    {
                        wall = energy[c];
                        wallCell = c;
                    }
                    foreach (int d in Neighbours(i, j, k, n))
                    {
                        if (!inside[d] || sink[d] == site)
                        {
                            continue;
                        }
                        double pass = Math.Max(energy[c], energy[d]);
                        if (atWall[sink[d]])
                        {
                            wallViaOther = Math.Min(wallViaOther, pass); // that basin slides into the wall
                        }
                        else if (pass < barrier)
                        {
                            barrier = pass;
                            neighbourSink = sink[d];
                        }
                    }
                }
            }
        }
        double halfDiagonal = h * Math.Sqrt(3) / 2;
        if (wallCell >= 0)
        {
            wall = LowestOnWallNear(landscape, Position(wallCell), h); // on the wall itself, not at the grid point just inside it
        }
        wall = Math.Min(wall, wallViaOther);

        // The other true minima (sinks not at the wall), refined by BFGS from their grid point.
        var others = new List<OtherMinimum>();
        Position? neighbour = null;
        foreach (int s in Enumerable.Range(0, energy.Length).Where(c => inside[c] && sink[c] == c && c != site && !atWall[c]))
        {
            var refined = Refine(landscape, Position(s), h) ?? Position(s);
            if (others.Any(o => (o.Position - refined).Norm < 1e-4) || (refined - minimum).Norm < 1e-4)
            {
                continue;
            }
            others.Add(new OtherMinimum(refined, landscape.Energy(refined) - siteEnergy));
            if (s == neighbourSink)
            {
                neighbour = refined;
            }
        }
        // Basin labels: 0 the site's basin, 1 … K the other minima in the order reported (sinks that refine to the same
        // minimum share one), K + 1 every cell whose descent ends at the confinement's wall.
        var ordered = others.OrderBy(o => o.EnergyAboveSiteInElectronVolts).ThenBy(o => (o.Position - minimum).Norm).ToList();
        var sinkLabel = new Dictionary<int, byte>();
        int wallLabel = Math.Min(ordered.Count + 1, 255);
        foreach (int s in Enumerable.Range(0, energy.Length).Where(c => inside[c] && sink[c] == c))
        {
            if (s == site)
            {
                sinkLabel[s] = 0;
                continue;
            }
            if (atWall[s])
            {
                sinkLabel[s] = (byte)wallLabel;
                continue;
            }
            var refined = Refine(landscape, Position(s), h) ?? Position(s);
            int match = ordered.FindIndex(o => (o.Position - refined).Norm < 1e-4);
            sinkLabel[s] = (byte)((refined - minimum).Norm < 1e-4 ? 0 : match >= 0 ? Math.Min(match + 1, wallLabel) : wallLabel);
        }
        // A draw belongs to its nearest grid point, which for a draw beside the wall can lie just outside the confinement:
        // such a point takes the site's label when one of its neighbours inside the confinement is in the site's basin,
        // else the label of its first inside neighbour.
        var labels = new byte[energy.Length];
        for (int k = 0; k < n; k++)
        {
            for (int j = 0; j < n; j++)
            {
                for (int i = 0; i < n; i++)
                {
                    int c = Index(i, j, k);
                    if (inside[c])
                    {
                        labels[c] = sinkLabel[sink[c]];
                        continue;
                    }
                    var near = Neighbours(i, j, k, n).Where(d => inside[d]).ToList();
                    labels[c] = near.Any(d => sink[d] == site) ? (byte)0 : near.Count > 0 ? sinkLabel[sink[near[0]]] : (byte)wallLabel;
                }
            }
        }
        // Passes between basins: the lowest over neighbouring cells of the higher of their two energies.
        var passes = new Dictionary<(int, int), double>();
        for (int k = 0; k < n; k++)
        {
            for (int j = 0; j < n; j++)
            {
                for (int i = 0; i < n; i++)
                {
                    int c = Index(i, j, k);
                    if (!inside[c])
                    {
                        continue;
                    }
                    foreach (int d in Neighbours(i, j, k, n))
                    {
                        if (!inside[d] || labels[d] <= labels[c])
                        {
                            continue;
                        }
                        var key = ((int)labels[c], (int)labels[d]);
                        double pass = Math.Max(energy[c], energy[d]) - siteEnergy;
                        passes[key] = passes.TryGetValue(key, out double old) ? Math.Min(old, pass) : pass;
                    }
                }
            }
        }
        bool anyOutside = Enumerable.Range(0, energy.Length).Any(c => inside[c] && sink[c] != site);
        var outsideMask = labels.Select(l => (byte)(l == 0 ? 0 : 1)).ToArray();
        var grid = new BasinGrid(centre.X - size, centre.Y - size, centre.Z - size, h, n, outsideMask, anyOutside)
        {
            Labels = labels,
            LabelCount = wallLabel + 1,
            Energies = [.. energy.Select(e => e - siteEnergy)],
            Passes = [.. passes.OrderBy(p => p.Key).Select(p => new BasinPass(p.Key.Item1, p.Key.Item2, Math.Max(0, p.Value)))],
        };
        return (new SiteBasin
        {
            Minimum = minimum,
            BarrierToNeighbourInElectronVolts = neighbourSink >= 0 ? Math.Max(0, barrier - siteEnergy) : null,
            NeighbourMinimum = neighbourSink >= 0 ? neighbour ?? Position(neighbourSink) : null,
            RiseToWallInElectronVolts = double.IsPositiveInfinity(wall) ? double.PositiveInfinity : Math.Max(0, wall - siteEnergy),
            OtherMinima = others.OrderBy(o => o.EnergyAboveSiteInElectronVolts).ThenBy(o => (o.Position - minimum).Norm).ToImmutableArray(),
            InscribedRadiusInAngstroms = Math.Max(0, (double.IsPositiveInfinity(inscribed) ? size : inscribed) - halfDiagonal),
            OuterRadiusInAngstroms = outer + halfDiagonal,
            GridSpacingInAngstroms = h,
        }, grid);
    }

    private static IEnumerable<int> Neighbours(int i, int j, int k, int n)
    {
        for (int dk = -1; dk <= 1; dk++)
        {
            for (int dj = -1; dj <= 1; dj++)
            {
                for (int di = -1; di <= 1; di++)
                {
                    int a = i + di, b = j + dj, c = k + dk;
                    if ((di | dj | dk) != 0 && a >= 0 && b >= 0 && c >= 0 && a < n && b < n && c < n)
                    {
                        yield return (c * n + b) * n + a;
                    }
                }
            }
        }
    }

    /// <summary>
    /// The lowest energy on the confinement's boundary near <paramref name="start"/>: a pattern search over points projected
    /// onto the boundary, with steps from one grid spacing down to a millionth of it.
    /// </summary>
    private static double LowestOnWallNear<TPotential>(SiteLandscape<TPotential> landscape, Position start, double h)
        where TPotential : struct, IPairPotential
    {
        var c = landscape.Centre;
        double size = landscape.Confinement.SizeInAngstroms;
        bool sphere = landscape.Confinement.Shape == ConfinementShape.Sphere;
        Position OnWall(Position p)
        {
            var d = p - c;
            if (sphere)
            {
                double r = d.Norm;
                return r == 0 ? c + new Position(0, 0, size) : c + (size / r) * d;
            }
            double x = Math.Clamp(d.X, -size, size), y = Math.Clamp(d.Y, -size, size), z = Math.Clamp(d.Z, -size, size);
            double ax = Math.Abs(x), ay = Math.Abs(y), az = Math.Abs(z);
            if (ax >= ay && ax >= az) { x = Math.CopySign(size, x); }
            else if (ay >= az) { y = Math.CopySign(size, y); }
            else { z = Math.CopySign(size, z); }
            return c + new Position(x, y, z);
        }
        var best = OnWall(start);
        double e = landscape.Energy(best);
        Position[] moves = [new(1, 0, 0), new(-1, 0, 0), new(0, 1, 0), new(0, -1, 0), new(0, 0, 1), new(0, 0, -1)];
        for (double step = h; step > 1e-6 * h; step /= 2)
        {
            bool improved = true;
            for (int round = 0; improved && round < 100; round++)
            {
                improved = false;
                foreach (var m in moves)
                {
                    var p = OnWall(best + step * m);
                    double ep = landscape.Energy(p);
                    if (ep < e)
                    {
                        (best, e, improved) = (p, ep, true);
                    }
                }
            }
        }
        return e;
    }

    /// <summary>The local minimum reached by BFGS (MathNet.Numerics) from <paramref name="start"/>, when it stays within two grid spacings of it and inside the confinement.</summary>
    private static Position? Refine<TPotential>(SiteLandscape<TPotential> landscape, Position start, double h)
        where TPotential : struct, IPairPotential
    {
        var objective = ObjectiveFunction.Gradient(v =>
        {
            var p = new Position(v[0], v[1], v[2]);
            var g = landscape.Gradient(p);
            return (landscape.Energy(p), Vector<double>.Build.Dense([g.X, g.Y, g.Z]));
        });
        try
        {
            var m = new BfgsMinimizer(1e-10, 1e-12, 1e-14, 500).FindMinimum(objective, Vector<double>.Build.Dense([start.X, start.Y, start.Z])).MinimizingPoint;
            var p = new Position(m[0], m[1], m[2]);
            return (p - start).Norm <= 2 * h && landscape.Contains(p) ? p : null;
        }
        catch (Exception ex) when (ex is MaximumIterationsException or ArgumentException or InvalidOperationException)
        {
            return null;
        }
    }

    /// <summary>The share of draws outside the basin above which a particle has left its site.</summary>
    internal const double LeftSiteThreshold = 1e-3;

    /// <summary>The basin's way out in words, for warnings.</summary>
    internal static string DescribeWayOut(SiteBasin basin)
        => basin.WayOutLeadsToAnotherMinimum
            ? $"a pass {Format(basin.BarrierToNeighbourInElectronVolts!.Value)} eV above the minimum towards another minimum at {basin.NeighbourMinimum!.Value}"
            : double.IsPositiveInfinity(basin.RiseToWallInElectronVolts)
                ? "none inside the confinement"
                : $"the confinement wall, {Format(basin.RiseToWallInElectronVolts)} eV above the minimum (no pass to another minimum is lower)";

    /// <summary>The left-site warning for draws found outside the basin.</summary>
    internal static Warning LeftSiteWarning(SiteBasin basin, double outside)
        => new(WarningCodes.LeftSite, string.Create(CultureInfo.InvariantCulture,
            $"The particle left its site: {outside:P1} of the draws lie outside the basin of the minimum at {basin.Minimum} (its lowest way out is {DescribeWayOut(basin)}). The mean, spread and covariance describe wherever it went, not a vibration at the site, so no Debye–Waller factor or harmonic comparison is given. To study the site, use a confinement inside its basin (every point within {basin.InscribedRadiusInAngstroms:G3} Å of the minimum is in it){(basin.OtherMinima.Length > 0 ? $"; {basin.OtherMinima.Length} other minima lie inside this confinement" : "")}."));

    /// <summary>The escape-risk warning of a site, naming the way out it measures and, when other minima were found, their harmonic population.</summary>
    internal static Warning EscapeWarning(SiteBasin basin, Temperature temperature)
    {
        double kt = temperature.ThermalEnergyInElectronVolts;
        double way = basin.LowestWayOutInElectronVolts;
        string others = basin.OtherMinima.Length > 0 && basin.OutsidePopulation is double p
            ? string.Create(CultureInfo.InvariantCulture, $" In equilibrium in this confinement the harmonic estimate puts {p:P1} of the probability at the {basin.OtherMinima.Length} other minima found; a chain that stays at the site describes the site, not that equilibrium.")
            : "";
        double ratio = kt / way;
        string body = basin.WayOutLeadsToAnotherMinimum
            ? string.Create(CultureInfo.InvariantCulture, $"kT is {ratio:P1} of the lowest way out of the site's basin, {DescribeWayOut(basin)}; the Boltzmann factor there is e^(-barrier/kT) = {Math.Exp(-1 / ratio):G2}: {ClassicalValidity.EscapeLikelihood(ratio)}, and the answer then depends on the confinement.")
            : string.Create(CultureInfo.InvariantCulture, $"kT is {ratio:P1} of the rise from the minimum to the confinement wall ({Format(way)} eV; no pass to another minimum is lower); the Boltzmann factor at the wall is e^(-rise/kT) = {Math.Exp(-1 / ratio):G2}: {(ratio < 0.1 ? "the particle rarely reaches the wall" : ratio < 0.2 ? "the particle reaches the wall now and then" : "the particle presses on the wall")}, so the answer depends on the confinement's size.");
        return new(WarningCodes.EscapeRisk, body + others);
    }

    private static string Format(double value) => value.ToString("G4", CultureInfo.InvariantCulture);
}

/// <summary>
/// The basin map as the samplers read it: grid points at (X0 + i·h, Y0 + j·h, Z0 + k·h), i, j, k in [0, N), and a byte per
/// point, 1 where the point is outside the site's basin (or outside the confinement). A position belongs to its nearest grid point.
/// </summary>
/// <remarks>AnyOutside: whether some point inside the confinement lies outside the basin; when none does (a confinement
/// inside one basin, the usual case) no draw can be outside, and the samplers skip the lookup.</remarks>
internal sealed record BasinGrid(double X0, double Y0, double Z0, double Spacing, int N, byte[] Outside, bool AnyOutside)
{
    /// <summary>Each grid point's basin: 0 the site's, 1 … K the other minima in <see cref="SiteBasin.OtherMinima"/>'s order, K + 1 the wall's.</summary>
    internal byte[] Labels { get; init; } = [];

    /// <summary>K + 2: the labels in use.</summary>
    internal int LabelCount { get; init; } = 1;

    /// <summary>V − V_site at each grid point, eV (+∞ outside the confinement).</summary>
    internal double[] Energies { get; init; } = [];

    /// <summary>The passes between neighbouring basins.</summary>
    internal ImmutableArray<BasinPass> Passes { get; init; } = [];

    /// <summary>The share of each basin in Σ e^(−(V − V_site)/kT) over the grid points inside the confinement (a grid quadrature).</summary>
    internal double[] QuadratureShares(double thermalEnergy)
    {
        var shares = new double[LabelCount];
        double total = 0;
        for (int c = 0; c < Energies.Length; c++)
        {
            if (double.IsPositiveInfinity(Energies[c]))
            {
                continue;
            }
            double w = Math.Exp(-Energies[c] / thermalEnergy);
            shares[Labels[c]] += w;
            total += w;
        }
        for (int i = 0; i < shares.Length; i++)
        {
            shares[i] /= total;
        }
        return shares;
    }

    /// <summary>The basin label of (x, y, z) by its nearest grid point.</summary>
    internal int LabelOf(double x, double y, double z) => Labels.Length == 0 ? (IsOutside(x, y, z) ? 1 : 0) : Labels[Index(x, y, z)];

    /// <summary>Whether the position is outside the site's basin (by its nearest grid point).</summary>
    internal bool IsOutside(double x, double y, double z) => Outside[Index(x, y, z)] != 0;

    /// <summary>The flat index of the grid point nearest (x, y, z), clamped to the grid.</summary>
    internal int Index(double x, double y, double z)
    {
        // Round half to even, as the lane kernel does, so both samplers assign a position to the same grid point.
        int i = Math.Clamp((int)Math.Round((x - X0) * (1 / Spacing), MidpointRounding.ToEven), 0, N - 1);
        int j = Math.Clamp((int)Math.Round((y - Y0) * (1 / Spacing), MidpointRounding.ToEven), 0, N - 1);
        int k = Math.Clamp((int)Math.Round((z - Z0) * (1 / Spacing), MidpointRounding.ToEven), 0, N - 1);
        return (k * N + j) * N + i;
    }
}
