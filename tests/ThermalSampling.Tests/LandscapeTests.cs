using System;
using System.Linq;
using FsCheck;
using FsCheck.Fluent;
using FsCheck.Xunit;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Units;
using Xunit;

namespace ThermalSampling.Tests;

public class LandscapeTests
{
    private static readonly LennardJones Lj = LennardJones.FromMinimum(Length.FromAngstroms(3.0), Energy.FromElectronVolts(0.05));

    [Fact]
    public void Reversed_or_empty_window_is_refused_naming_the_window()
    {
        var ex = Assert.Throws<ArgumentException>(() => PairLandscape.Line(Lj, Length.FromAngstroms(5), Length.FromAngstroms(2)));
        Assert.Equal("window", ex.ParamName);
        Assert.Contains("reversed", ex.Message);
        Assert.Throws<ArgumentException>(() => PairLandscape.Radial(Lj, Length.FromAngstroms(3), Length.FromAngstroms(3)));
    }

    [Fact]
    public void Window_reaching_inside_the_Buckingham_barrier_is_refused()
    {
        var oo = new Buckingham(Energy.FromElectronVolts(22764.0), Length.FromAngstroms(0.149), 27.88);
        var ex = Assert.Throws<ArgumentOutOfRangeException>(() => PairLandscape.Line(oo, Length.FromAngstroms(0.5), Length.FromAngstroms(2)));
        Assert.Equal("windowLower", ex.ParamName);
        Assert.Contains("barrier", ex.Message);
        var ok = PairLandscape.Line(oo, Length.FromAngstroms(oo.BarrierDistanceInAngstroms), Length.FromAngstroms(2));
        Assert.Equal(SeparationGeometry.Line, ok.Geometry);
    }

    [Fact]
    public void Window_beyond_a_table_is_refused()
    {
        var table = new TabulatedPotential(new[] { 1.0, 2, 3, 4, 5 }, new[] { 1.0, -0.5, -1, -0.5, 0 });
        Assert.Equal("windowUpper", Assert.Throws<ArgumentOutOfRangeException>(() => PairLandscape.Line(table, Length.FromAngstroms(1), Length.FromAngstroms(6))).ParamName);
    }

    [Fact]
    public void Negative_window_is_refused()
        => Assert.Equal("windowLower", Assert.Throws<ArgumentOutOfRangeException>(() => PairLandscape.Line(Lj, Length.FromAngstroms(-1), Length.FromAngstroms(6))).ParamName);

    [Theory]
    [InlineData(LatticeKind.FaceCentredCubic, 12, 6, 24)]
    [InlineData(LatticeKind.BodyCentredCubic, 8, 6, 12)]
    [InlineData(LatticeKind.SimpleCubic, 6, 12, 8)]
    public void Cubic_cages_have_the_textbook_shell_counts(LatticeKind lattice, int first, int second, int third)
    {
        // Source: Sources.Lattices
        Assert.Equal(first, LatticeSites.NeighbourCage(lattice, Length.FromAngstroms(2.5), 1).Length);
        Assert.Equal(first + second, LatticeSites.NeighbourCage(lattice, Length.FromAngstroms(2.5), 2).Length);
        Assert.Equal(first + second + third, LatticeSites.NeighbourCage(lattice, Length.FromAngstroms(2.5), 3).Length);
        Assert.All(LatticeSites.NeighbourCage(lattice, Length.FromAngstroms(2.5), 1), p => Assert.Equal(2.5, p.Norm, 10));
    }

    [Fact]
    public void Ideal_hcp_has_twelve_nearest_and_six_second_neighbours()
    {
        // Source: Sources.Lattices
        var cage = LatticeSites.NeighbourCage(LatticeKind.HexagonalClosePacked, Length.FromAngstroms(2.9), 2);
        Assert.Equal(18, cage.Length);
        Assert.Equal(12, cage.Count(p => Math.Abs(p.Norm - 2.9) < 1e-9));
        Assert.All(cage.Skip(12), p => Assert.Equal(2.9 * Math.Sqrt(2), p.Norm, 9));
    }

    private static readonly MillerIndices Facet111 = new(1, 1, 1), Facet100 = new(1, 0, 0), Facet110 = new(1, 1, 0);

    [Theory]
    [InlineData(LatticeKind.FaceCentredCubic, 1, 1, 1, AdsorptionSiteKind.Top, 1)]
    [InlineData(LatticeKind.FaceCentredCubic, 1, 1, 1, AdsorptionSiteKind.Bridge, 2)]
    [InlineData(LatticeKind.FaceCentredCubic, 1, 1, 1, AdsorptionSiteKind.FccHollow, 3)]
    [InlineData(LatticeKind.FaceCentredCubic, 1, 1, 1, AdsorptionSiteKind.HcpHollow, 3)]
    [InlineData(LatticeKind.FaceCentredCubic, 1, 0, 0, AdsorptionSiteKind.Top, 1)]
    [InlineData(LatticeKind.FaceCentredCubic, 1, 0, 0, AdsorptionSiteKind.Bridge, 2)]
    [InlineData(LatticeKind.FaceCentredCubic, 1, 0, 0, AdsorptionSiteKind.Hollow, 4)]
    [InlineData(LatticeKind.FaceCentredCubic, 0, 0, 2, AdsorptionSiteKind.Hollow, 4)] // (002) is (001), the same square net
    [InlineData(LatticeKind.SimpleCubic, 1, 0, 0, AdsorptionSiteKind.Hollow, 4)]
    [InlineData(LatticeKind.BodyCentredCubic, 1, 1, 0, AdsorptionSiteKind.Top, 1)]
    [InlineData(LatticeKind.BodyCentredCubic, 1, 1, 0, AdsorptionSiteKind.Bridge, 2)]
    public void Adsorption_start_touches_the_right_number_of_surface_atoms(LatticeKind lattice, int h, int k, int l, AdsorptionSiteKind site, int touching)
    {
        // Common practice, no source: the coordination of top, bridge and hollow sites on the low-index faces of cubic crystals.
        var g = LatticeSites.Surface(lattice, new MillerIndices(h, k, l), site, Length.FromAngstroms(2.55), layers: 3);
        var distances = g.Sites.Select(s => (s - g.Start).Norm).OrderBy(d => d).ToArray();
        Assert.Equal(touching, distances.Count(d => Math.Abs(d - 2.55) < 1e-9));
        Assert.True(distances[touching] > 2.55 + 1e-6, "no other atom is as close");
        Assert.True(g.Start.Z > 0);
        Assert.All(g.Sites, s => Assert.True(s.Z <= 1e-9, "the crystal lies at z <= 0"));
        Assert.Contains(g.Sites, s => s.Norm < 1e-9); // the origin is a top-layer atom
    }

    [Fact]
    public void The_two_three_fold_hollows_of_fcc_111_differ_by_the_layer_beneath()
    {
        // Common practice, no source: on a close-packed facet the fcc hollow continues ABC stacking (a third-layer atom
        // beneath it), the hcp hollow sits over a second-layer atom. Layer spacing of (111) is nn·√(2/3).
        double nn = 2.55, spacing = nn * Math.Sqrt(2.0 / 3.0);
        var fcc = LatticeSites.Surface(LatticeKind.FaceCentredCubic, Facet111, AdsorptionSiteKind.FccHollow, Length.FromAngstroms(nn));
        var hcp = LatticeSites.Surface(LatticeKind.FaceCentredCubic, Facet111, AdsorptionSiteKind.HcpHollow, Length.FromAngstroms(nn));
        bool Under(AdsorptionGeometry g, int layer) => g.Sites.Any(s => Math.Abs(s.Z + layer * spacing) < 1e-9 && Math.Abs(s.X - g.Start.X) < 1e-9 && Math.Abs(s.Y - g.Start.Y) < 1e-9);
        Assert.True(Under(fcc, 2) && !Under(fcc, 1), fcc.SiteDescription);
        Assert.True(Under(hcp, 1) && !Under(hcp, 2), hcp.SiteDescription);
        Assert.Equal(spacing, fcc.Frame.LayerSpacingInAngstroms, 12);
        Assert.Contains("third-layer", fcc.SiteDescription);
        Assert.Contains("second-layer", hcp.SiteDescription);
        Assert.NotEqual(fcc.Start, hcp.Start);
    }

    [Fact]
    public void An_ambiguous_or_absent_hollow_is_refused_with_the_kinds_the_facet_has()
    {
        var nn = Length.FromAngstroms(2.55);
        var both = Assert.Throws<ArgumentException>(() => LatticeSites.Surface(LatticeKind.FaceCentredCubic, Facet111, AdsorptionSiteKind.Hollow, nn));
        Assert.Contains("FccHollow", both.Message);
        Assert.Contains("HcpHollow", both.Message);
        var square = Assert.Throws<ArgumentException>(() => LatticeSites.Surface(LatticeKind.FaceCentredCubic, Facet100, AdsorptionSiteKind.FccHollow, nn));
        Assert.Contains("use Hollow", square.Message);
        Assert.Throws<ArgumentException>(() => LatticeSites.Surface(LatticeKind.FaceCentredCubic, new MillerIndices(0, 0, 0), AdsorptionSiteKind.Top, nn));
        var big = Assert.Throws<ArgumentOutOfRangeException>(() => LatticeSites.Surface(LatticeKind.FaceCentredCubic, new MillerIndices(7, 1, 0), AdsorptionSiteKind.Top, nn));
        Assert.Contains("-6 to 6", big.Message);
        Assert.Throws<ArgumentOutOfRangeException>(() => LatticeSites.Surface(LatticeKind.HexagonalClosePacked, Facet111, AdsorptionSiteKind.Top, nn));
    }

    [Theory]
    [InlineData(1, 1, 1, "[1 0 -1]", "[-1 2 -1]", "[1 1 1]")]
    [InlineData(1, 0, 0, "[0 1 1]", "[0 -1 1]", "[1 0 0]")]
    [InlineData(1, 1, 0, "[1 -1 0]", "[0 0 -1]", "[1 1 0]")]
    public void The_surface_frame_is_right_handed_reproducible_and_printed_as_crystal_directions(int h, int k, int l, string x, string y, string z)
    {
        var g = LatticeSites.Surface(LatticeKind.FaceCentredCubic, new MillerIndices(h, k, l), AdsorptionSiteKind.Top, Length.FromAngstroms(2.55));
        var f = g.Frame;
        var cross = new Position(f.Normal.Y * f.AxisX.Z - f.Normal.Z * f.AxisX.Y, f.Normal.Z * f.AxisX.X - f.Normal.X * f.AxisX.Z, f.Normal.X * f.AxisX.Y - f.Normal.Y * f.AxisX.X);
        Assert.Equal(0, (cross - f.AxisY).Norm, 12);
        Assert.Contains($"x along {x}", f.Description);
        Assert.Contains($"y along {y}", f.Description);
        Assert.Contains($"z along {z}", f.Description);
        var again = LatticeSites.Surface(LatticeKind.FaceCentredCubic, new MillerIndices(h, k, l), AdsorptionSiteKind.Top, Length.FromAngstroms(2.55));
        Assert.Equal(g.Sites.ToArray(), again.Sites.ToArray());
    }

    [Fact]
    public void An_open_facet_keeps_the_requested_number_of_layers_and_its_hollow_is_unique()
    {
        // fcc(110): rectangular top net nn × a; the widest hollow is the centre of the rectangle, over a second-layer atom
        // (common practice, no source). Its layer spacing is a/(2√2) = nn/2.
        double nn = 2.55;
        var g = LatticeSites.Surface(LatticeKind.FaceCentredCubic, Facet110, AdsorptionSiteKind.Hollow, Length.FromAngstroms(nn), layers: 4);
        Assert.Equal(4, g.Sites.Select(s => Math.Round(s.Z, 9)).Distinct().Count());
        Assert.Equal(nn / 2, g.Frame.LayerSpacingInAngstroms, 12);
        Assert.Contains("second-layer", g.SiteDescription);
        Assert.Equal(0.5 * Math.Sqrt(nn * nn + 2 * nn * nn), Math.Sqrt(g.Start.X * g.Start.X + g.Start.Y * g.Start.Y), 9);
    }

    private static SiteLandscape<LennardJones> FccCage(double nn) =>
        SiteLandscape.Create(Lj, LatticeSites.NeighbourCage(LatticeKind.FaceCentredCubic, Length.FromAngstroms(nn)), Position.Origin,
            Confinement.Sphere(Length.FromAngstroms(1.0)));

    [Fact]
    public void Fcc_cage_at_the_Lennard_Jones_minimum_distance_has_an_isotropic_Hessian_of_4_V2()
    {
        // With every neighbour at r0, V'(r0) = 0 and H = sum V''(r0) n n^T = (12/3) V''(r0) I = 4 * 72 u0/r0^2 I.
        // Sources.LennardJonesDerivatives; the lattice sum is derivable by hand (common practice).
        var cage = FccCage(3.0);
        var h = cage.Hessian(Position.Origin);
        double expected = 4 * 72 * 0.05 / 9.0;
        for (int i = 0; i < 3; i++)
        {
            for (int j = 0; j < 3; j++)
            {
                Assert.Equal(i == j ? expected : 0, h[i, j], 12);
            }
        }
        // And independently: central differences of the energy.
        double step = 1e-4;
        for (int i = 0; i < 3; i++)
        {
            var e = new double[3];
            e[i] = step;
            var p = new Position(e[0], e[1], e[2]);
            double fd = (cage.Energy(p) - 2 * cage.Energy(Position.Origin) + cage.Energy(Position.Origin - p)) / (step * step);
            Assert.True(Math.Abs(fd - expected) < 1e-5 * expected, $"d2E/dx{i}^2 = {fd} vs {expected}");
        }
        Assert.Equal(Position.Origin.X, cage.FindMinimum().X, 9);
    }

    [Fact]
    public void Gradient_Hessian_and_third_derivatives_match_finite_differences_off_centre()
    {
        var cage = SiteLandscape.Create(Lj, LatticeSites.NeighbourCage(LatticeKind.FaceCentredCubic, Length.FromAngstroms(2.9), 2),
            Position.Origin, Confinement.Box(Length.FromAngstroms(1)));
        var p = new Position(0.11, -0.07, 0.05);
        var g = cage.Gradient(p);
        var h = cage.Hessian(p);
        var t = cage.ThirdDerivatives(p);
        double step = 1e-4;
        for (int i = 0; i < 3; i++)
        {
            var e = new double[3];
            e[i] = step;
            var d = new Position(e[0], e[1], e[2]);
            double fdGrad = (cage.Energy(p + d) - cage.Energy(p - d)) / (2 * step);
            Assert.True(Math.Abs(fdGrad - g[i]) < 1e-6 * Math.Max(1, Math.Abs(g[i])), $"gradient {i}");
            var hPlus = cage.Hessian(p + d);
            var hMinus = cage.Hessian(p - d);
            for (int j = 0; j < 3; j++)
            {
                var gPlus = cage.Gradient(p + d)[j];
                var gMinus = cage.Gradient(p - d)[j];
                Assert.True(Math.Abs((gPlus - gMinus) / (2 * step) - h[i, j]) < 1e-5 * Math.Max(1, Math.Abs(h[i, j])), $"hessian {i}{j}");
                for (int k = 0; k < 3; k++)
                {
                    double fd = (hPlus[j, k] - hMinus[j, k]) / (2 * step);
                    Assert.True(Math.Abs(fd - t[i, j, k]) < 1e-5 * Math.Max(1, Math.Abs(t[i, j, k])), $"third {i}{j}{k}: {fd} vs {t[i, j, k]}");
                }
            }
        }
    }

    private static Arbitrary<(double Dx, double Dy, double Dz)> Shifts() =>
        (from x in Gen.Choose(-5000, 5000) from y in Gen.Choose(-5000, 5000) from z in Gen.Choose(-5000, 5000)
         select (x / 1000.0, y / 1000.0, z / 1000.0)).ToArbitrary();

    [Property(MaxTest = 100)]
    public Property Translating_all_sites_and_the_particle_leaves_the_energy_unchanged() => Prop.ForAll(Shifts(), s =>
    {
        var shift = new Position(s.Dx, s.Dy, s.Dz);
        var sites = LatticeSites.NeighbourCage(LatticeKind.BodyCentredCubic, Length.FromAngstroms(2.7), 2);
        var a = SiteLandscape.Create(Lj, sites, Position.Origin, Confinement.Sphere(Length.FromAngstroms(1)));
        var b = SiteLandscape.Create(Lj, sites.Select(x => x + shift), shift, Confinement.Sphere(Length.FromAngstroms(1)));
        var probe = new Position(0.13, 0.02, -0.2);
        return Math.Abs(a.Energy(probe) - b.Energy(probe + shift)) < 1e-12 * Math.Max(1, Math.Abs(a.Energy(probe)));
    });

    [Property(MaxTest = 50)]
    public Property Permuting_the_sites_leaves_the_energy_unchanged() => Prop.ForAll(Gen.Choose(0, int.MaxValue).ToArbitrary(), seed =>
    {
        var sites = LatticeSites.NeighbourCage(LatticeKind.FaceCentredCubic, Length.FromAngstroms(2.9), 2).ToArray();
        var shuffled = sites.OrderBy(p => HashCode.Combine(seed, p.X, p.Y, p.Z)).ToArray();
        var a = SiteLandscape.Create(Lj, sites, Position.Origin, Confinement.Sphere(Length.FromAngstroms(1)));
        var b = SiteLandscape.Create(Lj, shuffled, Position.Origin, Confinement.Sphere(Length.FromAngstroms(1)));
        var probe = new Position(0.1, -0.3, 0.2);
        return Math.Abs(a.Energy(probe) - b.Energy(probe)) < 1e-13 * Math.Abs(a.Energy(probe));
    });

    [Fact]
    public void Site_lists_with_bad_entries_are_refused_with_the_offending_index()
    {
        var sphere = Confinement.Sphere(Length.FromAngstroms(1));
        Assert.Contains("empty", Assert.Throws<ArgumentException>(() => SiteLandscape.Create(Lj, Array.Empty<Position>(), Position.Origin, sphere)).Message);
        var onCentre = Assert.Throws<ArgumentException>(() => SiteLandscape.Create(Lj, new[] { new Position(3, 0, 0), Position.Origin }, Position.Origin, sphere));
        Assert.Contains("sites[1]", onCentre.Message);
        Assert.Contains("coincides with the centre", onCentre.Message);
        var duplicate = Assert.Throws<ArgumentException>(() => SiteLandscape.Create(Lj, new[] { new Position(3, 0, 0), new Position(3, 0, 0) }, Position.Origin, sphere));
        Assert.Contains("on top of each other", duplicate.Message);
        var nan = Assert.Throws<ArgumentOutOfRangeException>(() => SiteLandscape.Create(Lj, new[] { new Position(double.NaN, 0, 0) }, Position.Origin, sphere));
        Assert.Equal("sites[0].X", nan.ParamName);
        Assert.Equal("radius", Assert.Throws<ArgumentOutOfRangeException>(() => Confinement.Sphere(Length.FromAngstroms(0))).ParamName);
    }

    [Fact]
    public void Minimum_outside_the_confinement_is_reported_not_returned()
    {
        // A single site: the particle is pushed out to r0 = 3 Å, far outside a 0.5 Å sphere around (1, 0, 0).
        var lone = SiteLandscape.Create(Lj, new[] { Position.Origin }, new Position(1.2, 0.1, 0), Confinement.Sphere(Length.FromAngstroms(0.5)));
        var ex = Assert.Throws<LandscapeException>(() => lone.FindMinimum());
        Assert.Contains("outside the confinement", ex.Message);
    }
}
