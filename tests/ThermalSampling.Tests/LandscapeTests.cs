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

    [Theory]
    [InlineData(SurfaceFacet.Fcc111, AdsorptionSiteKind.Top, 1)]
    [InlineData(SurfaceFacet.Fcc111, AdsorptionSiteKind.Bridge, 2)]
    [InlineData(SurfaceFacet.Fcc111, AdsorptionSiteKind.Hollow, 3)]
    [InlineData(SurfaceFacet.Fcc100, AdsorptionSiteKind.Top, 1)]
    [InlineData(SurfaceFacet.Fcc100, AdsorptionSiteKind.Bridge, 2)]
    [InlineData(SurfaceFacet.Fcc100, AdsorptionSiteKind.Hollow, 4)]
    public void Adsorption_start_touches_the_right_number_of_surface_atoms(SurfaceFacet facet, AdsorptionSiteKind site, int touching)
    {
        var g = LatticeSites.FccSurface(facet, site, Length.FromAngstroms(2.55), layers: 3);
        var distances = g.Sites.Select(s => (s - g.Start).Norm).OrderBy(d => d).ToArray();
        Assert.Equal(touching, distances.Count(d => Math.Abs(d - 2.55) < 1e-9));
        Assert.True(distances[touching] > 2.55 + 1e-6, "no other atom is as close");
        Assert.True(g.Start.Z > 0);
    }

    [Fact]
    public void Fcc111_hollow_is_the_fcc_hollow_above_a_third_layer_atom()
    {
        var g = LatticeSites.FccSurface(SurfaceFacet.Fcc111, AdsorptionSiteKind.Hollow, Length.FromAngstroms(2.55), layers: 3);
        double third = -2 * 2.55 * Math.Sqrt(2.0 / 3.0);
        double second = -2.55 * Math.Sqrt(2.0 / 3.0);
        Assert.Contains(g.Sites, s => Math.Abs(s.Z - third) < 1e-9 && Math.Abs(s.X - g.Start.X) < 1e-9 && Math.Abs(s.Y - g.Start.Y) < 1e-9);
        Assert.DoesNotContain(g.Sites, s => Math.Abs(s.Z - second) < 1e-9 && Math.Abs(s.X - g.Start.X) < 1e-9 && Math.Abs(s.Y - g.Start.Y) < 1e-9);
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
