using System;
using System.Linq;
using MathNet.Numerics;
using ThermalSampling.Analysis;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Reports;
using ThermalSampling.Sampling;
using ThermalSampling.Units;
using Xunit;

namespace ThermalSampling.Tests;

/// <summary>
/// The basin of a site's minimum, the barrier out of it, and the verdict when the particle leaves its site. Invented
/// landscape: an atom of 50 u over the four-fold hollow of an fcc(100) slab (nearest-neighbour distance 2.6 Å) held by
/// Lennard-Jones pairs with ε = 0.015 eV at r_min = 2.6 Å (round, made-up values).
/// </summary>
public class BasinTests
{
    private const double Nn = 2.6;
    private static readonly LennardJones Lj = LennardJones.FromMinimum(Length.FromAngstroms(Nn), Energy.FromElectronVolts(0.015));
    private static readonly Mass Mass50 = Mass.FromAtomicMassUnits(50);
    private static readonly AdsorptionGeometry Hollow100 =
        LatticeSites.Surface(LatticeKind.FaceCentredCubic, new MillerIndices(1, 0, 0), AdsorptionSiteKind.Hollow, Length.FromAngstroms(Nn), layers: 3, lateralRadiusInNeighbourDistances: 6);

    /// <summary>A sphere wide enough to hold the four neighbouring hollows (each one neighbour distance away).</summary>
    private static SiteLandscape<LennardJones> Wide() => SiteLandscape.AboveSurface(Lj, Hollow100, Confinement.Sphere(Length.FromAngstroms(3.2)));

    private static SiteLandscape<LennardJones> Tight() => SiteLandscape.AboveSurface(Lj, Hollow100, Confinement.Sphere(Length.FromAngstroms(0.6)));

    private static Position SiteMinimum(SiteLandscape<LennardJones> landscape) => SiteAnalysis.Harmonic(landscape, Mass50, Temperature.FromKelvin(10)).Minimum;

    [Fact]
    public void The_barrier_between_neighbouring_hollows_is_the_saddle_above_the_bridge()
    {
        // Independent reference: by symmetry the pass between two (100) hollows lies above the bridge between them; its
        // energy is the lowest energy along the normal there (MathNet golden-section search). The grid map may not pass
        // lower than the saddle and, at 0.1 Å spacing, lies within 5 % of it.
        var landscape = Wide();
        var min = SiteMinimum(landscape);
        var basin = SiteBasins.Map(landscape, min);
        // The hollow's four neighbours lie one neighbour distance away, along the frame's x and y.
        var neighbours = basin.OtherMinima.Where(m => Math.Abs((m.Position - min).Norm - Nn) < 0.05).ToList();
        Assert.Equal(4, neighbours.Count);
        // Equivalent hollows, as deep as the site but for the finite slab (they sit off its centre): within 0.1 meV.
        Assert.All(neighbours, m => Assert.InRange(m.EnergyAboveSiteInElectronVolts, -1e-4, 1e-4));
        var towards = basin.NeighbourMinimum!.Value;
        var mid = 0.5 * (min + towards);
        double saddleZ = FindMinimum.OfScalarFunctionConstrained(z => landscape.Energy(new Position(mid.X, mid.Y, z)), min.Z - 0.5, min.Z + 2, 1e-10);
        double saddle = landscape.Energy(new Position(mid.X, mid.Y, saddleZ)) - landscape.Energy(min);
        Assert.True(saddle > 0, "the bridge is higher than the hollow");
        double barrier = basin.BarrierToNeighbourInElectronVolts!.Value;
        Assert.InRange(barrier, saddle * 0.999, saddle * 1.05);
        Assert.Equal(Math.Min(barrier, basin.RiseToWallInElectronVolts), basin.LowestWayOutInElectronVolts);
        Assert.InRange(basin.InscribedRadiusInAngstroms, 0.5, Nn);
    }

    [Fact]
    public void A_particle_that_hops_to_the_next_hollow_is_reported_as_having_left_its_site_without_a_B_factor()
    {
        // kT far above the hollow-to-hollow barrier: the chains roam over five hollows.
        var settings = new SamplingSettings { Seed = 5, Chains = 4, SamplesPerChain = 20_000, BurnIn = 4_000 };
        var hot = SiteSampler.Run(Wide(), Mass50, Temperature.FromKelvin(150), settings);
        Assert.False(hot.StaysAtSite);
        Assert.True(hot.ShareOutsideBasin > 0.3, $"share outside {hot.ShareOutsideBasin}");
        Assert.Null(hot.DebyeWallerB);
        Assert.Null(hot.IsotropicDisplacement);
        var warning = Assert.Single(hot.Warnings, w => w.Code == WarningCodes.LeftSite);
        Assert.Contains("left its site", warning.Message);
        Assert.Contains("no Debye–Waller factor", warning.Message);
        // Roaming over five hollows takes the particle far beyond ±6 harmonic σ of the first: the densities say what they miss.
        var beyond = Assert.Single(hot.Warnings, w => w.Code == WarningCodes.BeyondDistributionRange);
        Assert.Contains("beyond the distribution histograms' range", beyond.Message);
        Assert.True(hot.Distribution.ShareOutsideMarginals.Max() > 0.1);

        // The same landscape cold: the chains stay in the hollow's basin, B is reported, no left-site warning.
        var cold = SiteSampler.Run(Wide(), Mass50, Temperature.FromKelvin(5), settings);
        Assert.True(cold.StaysAtSite, $"share outside {cold.ShareOutsideBasin}");
        Assert.NotNull(cold.DebyeWallerB);
        Assert.DoesNotContain(cold.Warnings, w => w.Code == WarningCodes.LeftSite);
        Assert.DoesNotContain(cold.Warnings, w => w.Code == WarningCodes.BeyondDistributionRange);
    }

    [Theory]
    [InlineData(SamplingMethod.Metropolis, 60, true)]
    [InlineData(SamplingMethod.Direct, 30, false)] // a Gaussian envelope cannot cover two hollows: direct sampling runs in a 12-neighbour cage, one basin
    public void Both_samplers_count_draws_outside_the_basin_as_the_map_places_them(SamplingMethod method, double kelvin, bool crosses)
    {
        // Every draw kept: the share outside must equal the share of kept draws the map puts outside, counted here.
        const int n = 8192;
        var landscape = method == SamplingMethod.Metropolis
            ? Wide()
            : SiteLandscape.Create(Lj, LatticeSites.NeighbourCage(LatticeKind.FaceCentredCubic, Length.FromAngstroms(Nn)), Position.Origin, Confinement.Sphere(Length.FromAngstroms(0.3)));
        var settings = new SamplingSettings { Seed = 3, Chains = 2, SamplesPerChain = n, BurnIn = 2_000, RetainedDrawsPerChain = n, Method = method };
        var report = SiteSampler.Run(landscape, Mass50, Temperature.FromKelvin(kelvin), settings);
        var grid = SiteBasins.MapWithGrid(landscape, report.Minimum).Grid;
        var draws = report.Draws.Chains.SelectMany(c => c).ToArray();
        double counted = draws.Count(p => grid.IsOutside(p.X, p.Y, p.Z)) / (double)draws.Length;
        Assert.Equal(counted, report.ShareOutsideBasin, 12);
        Assert.True(counted > 0 == crosses, $"share outside {counted}");
        // Each basin's mean and MSD about it, from the per-basin sums, equal those of the kept draws the map puts in it.
        var withDraws = report.BasinPopulations.Where(b => b.Mean is not null).ToList();
        Assert.Equal(crosses, withDraws.Count > 1);
        foreach (var b in withDraws.Where(_ => crosses))
        {
            var mine = draws.Where(p => grid.LabelOf(p.X, p.Y, p.Z) == b.Index).ToList();
            var mean = (1.0 / mine.Count) * new Position(mine.Sum(p => p.X), mine.Sum(p => p.Y), mine.Sum(p => p.Z));
            double msd = mine.Average(p => (p - mean).Norm * (p - mean).Norm);
            double xy = mine.Average(p => (p.X - mean.X) * (p.Y - mean.Y)), xz = mine.Average(p => (p.X - mean.X) * (p.Z - mean.Z));
            double yz = mine.Average(p => (p.Y - mean.Y) * (p.Z - mean.Z)), zz = mine.Average(p => (p.Z - mean.Z) * (p.Z - mean.Z));
            Assert.Equal(xy, b.Covariance!.Value.XY, 9);
            Assert.Equal(xz, b.Covariance.Value.XZ, 9);
            Assert.Equal(yz, b.Covariance.Value.YZ, 9);
            Assert.Equal(zz, b.Covariance.Value.ZZ, 9);
            Assert.Equal(mean.X, b.Mean!.Value.X, 9);
            Assert.Equal(mean.Y, b.Mean.Value.Y, 9);
            Assert.Equal(mean.Z, b.Mean.Value.Z, 9);
            Assert.Equal(msd, b.MeanSquareDisplacement!.Value, 9);
        }
    }

    /// <summary>The direct sampler's per-basin sums: a cage whose confinement reaches past its square windows (points beyond them descend to the wall) gives each basin with draws the mean of its kept draws.</summary>
    [Fact]
    public void Direct_draws_give_each_basin_the_mean_of_its_own_draws()
    {
        const int n = 8192;
        var landscape = SiteLandscape.Create(Lj, LatticeSites.NeighbourCage(LatticeKind.FaceCentredCubic, Length.FromAngstroms(Nn)), Position.Origin, Confinement.Sphere(Length.FromAngstroms(2.0)));
        var settings = new SamplingSettings { Seed = 5, Chains = 2, SamplesPerChain = n, RetainedDrawsPerChain = n, Method = SamplingMethod.Direct };
        var report = SiteSampler.Run(landscape, Mass50, Temperature.FromKelvin(600), settings);
        var grid = SiteBasins.MapWithGrid(landscape, report.Minimum).Grid;
        var draws = report.Draws.Chains.SelectMany(c => c).ToArray();
        var withDraws = report.BasinPopulations.Where(b => b.Mean is not null).ToList();
        Assert.True(grid.AnyOutside && withDraws.Count >= 1, $"{grid.LabelCount} labels, any outside {grid.AnyOutside}, {withDraws.Count} basins with draws");
        foreach (var b in withDraws)
        {
            var mine = draws.Where(p => grid.LabelOf(p.X, p.Y, p.Z) == b.Index).ToList();
            var mean = (1.0 / mine.Count) * new Position(mine.Sum(p => p.X), mine.Sum(p => p.Y), mine.Sum(p => p.Z));
            Assert.Equal(mean.X, b.Mean!.Value.X, 9);
            Assert.Equal(mean.Z, b.Mean.Value.Z, 9);
        }
    }

    [Fact]
    public void In_a_confinement_inside_the_basin_the_way_out_is_the_wall_and_no_other_minimum_is_found()
    {
        var landscape = Tight();
        var (basin, grid) = SiteBasins.MapWithGrid(landscape, SiteMinimum(landscape));
        Assert.False(grid.AnyOutside); // so the samplers skip the per-draw lookup
        Assert.True(SiteBasins.MapWithGrid(Wide(), SiteMinimum(Wide())).Grid.AnyOutside);
        Assert.Null(basin.BarrierToNeighbourInElectronVolts);
        Assert.Empty(basin.OtherMinima);
        Assert.False(basin.WayOutLeadsToAnotherMinimum);
        Assert.True(double.IsFinite(basin.RiseToWallInElectronVolts) && basin.RiseToWallInElectronVolts > 0);
        var hot = SiteBasins.AtTemperature(basin, landscape, Temperature.FromKelvin(100));
        Assert.Equal(0, hot.OutsidePopulation);
    }

    [Fact]
    public void Harmonic_superposition_weighs_the_four_equivalent_hollows_equally()
    {
        // Four neighbours as deep as the site with the same Hessian: the site holds 1/5 of the probability.
        var landscape = Wide();
        var basin = SiteBasins.AtTemperature(SiteBasins.Map(landscape, SiteMinimum(landscape)), landscape, Temperature.FromKelvin(20));
        var equivalent = basin.OtherMinima.Where(m => Math.Abs(m.EnergyAboveSiteInElectronVolts) < 1e-4).ToList();
        Assert.Equal(4, equivalent.Count);
        Assert.All(equivalent, m => Assert.InRange(m.HarmonicWeight!.Value, 0.97, 1.03)); // equal but for the finite slab
        Assert.True(basin.OutsidePopulation >= 0.79, $"{basin.OutsidePopulation}");
    }

    [Fact]
    public void A_confinement_that_reaches_under_or_past_the_slab_is_refused_naming_the_limit()
    {
        var deep = Assert.Throws<ArgumentException>(() => SiteLandscape.AboveSurface(Lj, Hollow100, Confinement.Box(Length.FromAngstroms(20))));
        Assert.Contains("vacuum on one side only", deep.Message);
        Assert.Contains("more layers", deep.Message);
        var wideSlab = LatticeSites.Surface(LatticeKind.FaceCentredCubic, new MillerIndices(1, 0, 0), AdsorptionSiteKind.Hollow, Length.FromAngstroms(Nn), layers: 10, lateralRadiusInNeighbourDistances: 1);
        var edge = Assert.Throws<ArgumentException>(() => SiteLandscape.AboveSurface(Lj, wideSlab, Confinement.Sphere(Length.FromAngstroms(2))));
        Assert.Contains("walk off the slab", edge.Message);
    }

    [Fact]
    public void The_basin_map_is_the_same_for_the_same_landscape_and_cached()
    {
        var landscape = Wide();
        var min = SiteMinimum(landscape);
        Assert.Same(SiteBasins.Map(landscape, min), SiteBasins.Map(landscape, min));
        var again = SiteBasins.Map(Wide(), min);
        Assert.Equal(SiteBasins.Map(landscape, min).BarrierToNeighbourInElectronVolts, again.BarrierToNeighbourInElectronVolts);
    }
}

/// <summary>
/// Every basin of a site and its population: an invented fcc(111) patch (Lennard-Jones pairs, 15 meV at 2.6 Å; 50 u)
/// with the confinement (a sphere of 1.7 Å about the fcc hollow) holding the fcc hollow and the three hcp hollows around
/// it (the two kinds of three-fold hollow, 1.5 Å apart).
/// </summary>
public class BasinPopulationTests(Xunit.Abstractions.ITestOutputHelper output)
{
    private static readonly SiteLandscape<LennardJones> Patch = SiteLandscape.AboveSurface(
        LennardJones.FromMinimum(Length.FromAngstroms(2.6), Energy.FromElectronVolts(0.015)),
        LatticeSites.Surface(LatticeKind.FaceCentredCubic, new MillerIndices(1, 1, 1), AdsorptionSiteKind.FccHollow, Length.FromAngstroms(2.6), layers: 3,
            lateralRadiusInNeighbourDistances: 5),
        Confinement.Sphere(Length.FromAngstroms(1.7)));

    private static readonly SamplingSettings Settings = new() { Seed = 1, Chains = 8, SamplesPerChain = 100_000, BurnIn = 10_000 };

    /// <summary>
    /// Both kinds of hollow are found (the site's fcc hollow and three hcp hollows 1.5 Å away, a neighbour distance/√3);
    /// at 40 K the sampled populations agree within 4 standard errors with an independent quadrature of each basin (the
    /// midpoint rule on a 0.04 Å grid, finer than the map's, each point given its basin by the map), and so does the map's
    /// own grid quadrature within 3 %; the passes between the site and each hcp hollow are the same (symmetry).
    /// </summary>
    [Fact]
    public void Both_kinds_of_hollow_are_found_and_populated_as_a_quadrature_says()
    {
        var t = Temperature.FromKelvin(40);
        var report = SiteSampler.Run(Patch, Mass.FromAtomicMassUnits(50), t, Settings);
        var hollows = report.Basin.OtherMinima;
        Assert.Equal(3, hollows.Length);
        Assert.All(hollows, h => Assert.InRange((h.Position - report.Minimum).Norm, 2.6 / Math.Sqrt(3) - 0.02, 2.6 / Math.Sqrt(3) + 0.02));
        var grid = SiteBasins.MapWithGrid(Patch, report.Minimum).Grid;
        double kt = t.ThermalEnergyInElectronVolts, e0 = Patch.Energy(report.Minimum);
        var weights = new double[grid.LabelCount];
        var first = new double[grid.LabelCount, 3];
        var second = new double[grid.LabelCount];
        const double h = 0.04;
        var c = Patch.Centre;
        for (double x = -1.7; x <= 1.7; x += h)
        {
            for (double y = -1.7; y <= 1.7; y += h)
            {
                for (double z = -1.7; z <= 1.7; z += h)
                {
                    var p = new Position(c.X + x, c.Y + y, c.Z + z);
                    if (Patch.Contains(p))
                    {
                        int label = grid.LabelOf(p.X, p.Y, p.Z);
                        double w = Math.Exp(-(Patch.Energy(p) - e0) / kt);
                        weights[label] += w;
                        (first[label, 0], first[label, 1], first[label, 2]) = (first[label, 0] + w * p.X, first[label, 1] + w * p.Y, first[label, 2] + w * p.Z);
                        second[label] += w * (p.X * p.X + p.Y * p.Y + p.Z * p.Z);
                    }
                }
            }
        }
        double total = weights.Sum();
        foreach (var b in report.BasinPopulations)
        {
            double quadrature = weights[b.Index] / total;
            output.WriteLine($"basin {b.Index}: sampled {b.SampledShare.Value:F4} ± {b.SampledShare.StandardError:F4}, map quadrature {b.QuadratureShare:F4}, fine quadrature {quadrature:F4}, harmonic {b.HarmonicShare:F4}");
            Assert.True(Math.Abs(b.SampledShare.ZScore(quadrature)) < 4, $"basin {b.Index}");
            Assert.InRange(b.QuadratureShare / quadrature, 0.97, 1.03);
            // The draws in the basin alone against the same quadrature restricted to it: their mean position (4 standard
            // errors and 0.005 Å for the grid) and their mean-square displacement about it (4 standard errors and 3 %).
            var mean = (1 / weights[b.Index]) * new Position(first[b.Index, 0], first[b.Index, 1], first[b.Index, 2]);
            double msd = second[b.Index] / weights[b.Index] - (mean.X * mean.X + mean.Y * mean.Y + mean.Z * mean.Z);
            var sampledMean = b.Mean!.Value;
            var se = b.MeanStandardError!.Value;
            output.WriteLine($"  mean {sampledMean} ± {se} (quadrature {mean}); MSD {b.MeanSquareDisplacement!.Value:F5} ± {b.MeanSquareDisplacement.StandardError:F5} (quadrature {msd:F5})");
            Assert.True(Math.Abs(sampledMean.X - mean.X) < 4 * se.X + 0.005, $"basin {b.Index} x");
            Assert.True(Math.Abs(sampledMean.Y - mean.Y) < 4 * se.Y + 0.005, $"basin {b.Index} y");
            Assert.True(Math.Abs(sampledMean.Z - mean.Z) < 4 * se.Z + 0.005, $"basin {b.Index} z");
            Assert.True(Math.Abs(b.MeanSquareDisplacement.Value - msd) < 4 * b.MeanSquareDisplacement.StandardError + 0.03 * msd, $"basin {b.Index} MSD");
            Assert.Equal(b.MeanSquareDisplacement.Value, b.Covariance!.Value.Trace, 12);
        }
        // Each basin's draws sit about its own minimum: their mean is nearer to it than to any other basin's (the hollows are
        // 1.5 Å apart; the means lie within 0.2 Å of their minima, pushed up and inwards by the slab and the confinement).
        foreach (var b in report.BasinPopulations)
        {
            var nearest = report.BasinPopulations.MinBy(o => (b.Mean!.Value - o.Minimum!.Value).Norm)!;
            Assert.Equal(b.Index, nearest.Index);
            Assert.InRange((b.Mean!.Value - b.Minimum!.Value).Norm, 0, 0.2);
        }
        Assert.Equal(1.0, report.BasinPopulations.Sum(b => b.SampledShare.Value), 12);
        var toSite = report.BasinPasses.Where(p => p.From == 0).Select(p => p.PassAboveSiteInElectronVolts).ToList();
        Assert.Equal(3, toSite.Count);
        Assert.InRange(toSite.Max() - toSite.Min(), 0, 0.002);
    }

    /// <summary>At 10 K the chains stay in the site's hollow (hops over the 6 meV pass are rare), at 40 K they share four hollows: the sweep is warned about.</summary>
    [Fact]
    public void A_sweep_whose_population_moves_between_basins_is_warned_about()
    {
        var settings = Settings with { Chains = 4, SamplesPerChain = 20_000 };
        var reports = new[] { 10.0, 40 }.Select(k => SiteSampler.Run(Patch, Mass.FromAtomicMassUnits(50), Temperature.FromKelvin(k), settings)).ToList();
        var warning = SweepWarnings.BasinPopulationShift(reports);
        Assert.NotNull(warning);
        Assert.Equal(WarningCodes.BasinPopulationShift, warning!.Code);
        Assert.Contains("basin 0 (the site's) holds", warning.Message);
        Assert.Null(SweepWarnings.BasinPopulationShift([reports[1]]));
        string svg = Plotting.VibrationFigures.BasinPopulations(reports).GetSvgXml(800, 500);
        Assert.Contains("site basin, sampled", svg);
        Assert.Contains("basin 3, quadrature", svg);
    }
}
