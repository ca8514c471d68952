using System;
using System.Linq;
using ThermalSampling.Analysis;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Sampling;
using ThermalSampling.Units;
using Xunit;

namespace ThermalSampling.Tests;

/// <summary>A site's point symmetry found from its landscape, and what it forces on the displacement tensors.</summary>
public class SymmetryTests
{
    private static readonly LennardJones Pair = InventedLandscapes.Pair;

    /// <summary>
    /// The fcc cage (12 neighbours, centre of the cube's symmetry) has the full cubic group, 48 operations (a fact of
    /// the trade): the covariance is isotropic, every third cumulant vanishes, and the fourth has the cubic form
    /// κ1111 = κ2222 = κ3333, κ1122 = κ1133 = κ2233, the rest zero. The sampled tensors agree: every component symmetry
    /// forces to zero lies within 4.5 of its errors.
    /// </summary>
    [Fact]
    public void The_fcc_cage_has_the_cubic_group_and_the_sampled_tensors_obey_it()
    {
        var cage = InventedLandscapes.Cage;
        var report = SiteSampler.Run(cage, Mass.FromAtomicMassUnits(40), Temperature.FromKelvin(60),
            new SamplingSettings { Seed = 21, Chains = 8, SamplesPerChain = 100_000, BurnIn = 5000 });
        var s = report.Symmetry;
        Assert.Equal(48, s.Operations.Length);
        Assert.Equal("Oh", s.PointGroup);
        // Symmetrised: the third cumulants vanish exactly, the fourth has the cubic form exactly, and each symmetrised
        // value agrees with the unconstrained one within 4.5 of the latter's errors.
        var sym = report.Symmetrised;
        Assert.Equal("Oh", sym.PointGroup);
        Assert.All(sym.ThirdCumulants, k => Assert.Equal(0, k.Value, 1e-20));
        Assert.Equal(sym.FourthCumulants[0].Value, sym.FourthCumulants[10].Value, 1e-15);
        Assert.Equal(sym.FourthCumulants[3].Value, sym.FourthCumulants[12].Value, 1e-15);
        for (int c = 0; c < 15; c++)
        {
            Assert.InRange((sym.FourthCumulants[c].Value - report.FourthCumulants[c].Value) / report.FourthCumulants[c].StandardError, -4.5, 4.5);
            Assert.True(sym.FourthCumulants[c].StandardError <= report.FourthCumulants[c].StandardError * 1.0001 || s.FourthForm[c] == -1,
                "averaging equal components does not raise the error");
        }
        Assert.Equal(sym.Covariance.XX, sym.Covariance.ZZ, 1e-15);
        Assert.Equal(0, sym.Covariance.XY);
        Assert.Equal([0, -1, -1, 0, -1, 0], s.CovarianceForm.ToArray());
        Assert.All(s.ThirdForm, f => Assert.Equal(-1, f));
        Assert.Equal([0, -1, -1, 3, -1, 3, -1, -1, -1, -1, 0, -1, 3, -1, 0], s.FourthForm.ToArray());
        for (int c = 0; c < 15; c++)
        {
            if (s.FourthForm[c] == -1)
            {
                var k = report.FourthCumulants[c];
                Assert.InRange(k.Value / k.StandardError, -4.5, 4.5);
            }
        }
        Assert.All(report.ThirdCumulants, k => Assert.InRange(k.Value / k.StandardError, -4.5, 4.5));
    }

    /// <summary>
    /// A three-fold hollow of fcc(111) has C3v symmetry, 6 operations (a fact of the trade): the in-plane covariance is
    /// isotropic (U11 = U22, U12 = 0) and the normal is a principal axis (U13 = U23 = 0), which the harmonic covariance
    /// obeys to rounding.
    /// </summary>
    [Fact]
    public void A_three_fold_hollow_has_six_operations_and_an_isotropic_in_plane_covariance()
    {
        var g = LatticeSites.Surface(LatticeKind.FaceCentredCubic, new MillerIndices(1, 1, 1), AdsorptionSiteKind.FccHollow, Length.FromAngstroms(3.5));
        var site = SiteLandscape.AboveSurface(Pair, g, Confinement.Sphere(Length.FromAngstroms(0.6)));
        var h = SiteAnalysis.Harmonic(site, Mass.FromAtomicMassUnits(40), Temperature.FromKelvin(20));
        var s = SiteSymmetry.Find(site, h.Minimum);
        Assert.Equal(6, s.Operations.Length);
        Assert.Equal("C3v", s.PointGroup);
        Assert.Equal([0, -1, -1, 0, -1, 5], s.CovarianceForm.ToArray());
        // A three-fold axis relates third-order components by proportions as well as equalities; the group average keeps
        // exactly the invariant part: averaging twice changes nothing, and an invariant tensor is left as it is.
        double[] anyThird = [1, 2, 3, 4, 5, 6, 7, 8, 9, 10];
        var once = s.Symmetrise(anyThird);
        Assert.Equal(once, s.Symmetrise(once), (a, b) => Math.Abs(a - b) < 1e-12);
        Assert.Equal(-once[0], once[3], 1e-12); // κ111 = −κ122 or κ222 = −κ112, whichever the mirror keeps
        Assert.True(Math.Abs(once[0]) > 1e-6 || Math.Abs(once[6]) > 1e-6, "a C3v site allows a third cumulant in the plane");
        var u = h.ClassicalCovariance;
        Assert.Equal(u.XX, u.YY, 1e-9 * u.XX);
        Assert.True(Math.Abs(u.XY) < 1e-9 * u.XX && Math.Abs(u.XZ) < 1e-9 * u.XX && Math.Abs(u.YZ) < 1e-9 * u.XX);
    }

    /// <summary>A site moved off its symmetric point keeps only the identity: nothing is forced.</summary>
    [Fact]
    public void A_site_without_symmetry_forces_nothing()
    {
        var sites = LatticeSites.NeighbourCage(LatticeKind.FaceCentredCubic, Length.FromAngstroms(3.5)).Skip(1).ToArray(); // one neighbour removed
        var site = SiteLandscape.Create(Pair, sites.Append(new Position(0.3, 3.1, -1.7)), Position.Origin, Confinement.Sphere(Length.FromAngstroms(1.0)));
        var s = SiteSymmetry.Find(site, site.FindMinimum());
        Assert.Single(s.Operations);
        Assert.Equal("C1", s.PointGroup);
        Assert.Equal(Enumerable.Range(0, 10), s.ThirdForm);
        double[] any = [1, 2, 3, 4, 5, 6];
        Assert.Equal(any, s.Symmetrise(any));
    }

    /// <summary>
    /// Point groups named from their operations, as the trade names them (Schoenflies; facts of the trade): the cubic
    /// cage Oh; a square hollow of fcc(100) C4v; the hollow of fcc(110) C2v; and groups built here from
    /// generators: D4h, D3d, Td, D6h, S4, Ci, Cs.
    /// </summary>
    [Fact]
    public void Point_groups_are_named_from_their_operations()
    {
        static SiteSymmetry Of(LatticeKind lattice, MillerIndices facet, AdsorptionSiteKind kind)
        {
            var site = SiteLandscape.AboveSurface(Pair, LatticeSites.Surface(lattice, facet, kind, Length.FromAngstroms(3.5)), Confinement.Sphere(Length.FromAngstroms(0.6)));
            return SiteSymmetry.Find(site, SiteAnalysis.Harmonic(site, Mass.FromAtomicMassUnits(40), Temperature.FromKelvin(20)).Minimum);
        }
        Assert.Equal("C4v", Of(LatticeKind.FaceCentredCubic, new MillerIndices(1, 0, 0), AdsorptionSiteKind.Hollow).PointGroup);
        Assert.Equal("C2v", Of(LatticeKind.FaceCentredCubic, new MillerIndices(1, 1, 0), AdsorptionSiteKind.Hollow).PointGroup);

        double[] identity = [1, 0, 0, 0, 1, 0, 0, 0, 1], inversion = [-1, 0, 0, 0, -1, 0, 0, 0, -1];
        double[] c4z = [0, -1, 0, 1, 0, 0, 0, 0, 1], c2x = [1, 0, 0, 0, -1, 0, 0, 0, -1], mz = [1, 0, 0, 0, 1, 0, 0, 0, -1];
        double[] s4z = [0, 1, 0, -1, 0, 0, 0, 0, -1], c3z = Rotation(2 * Math.PI / 3), c6z = Rotation(Math.PI / 3), c3xyz = [0, 0, 1, 1, 0, 0, 0, 1, 0];
        double[] mxy = [0, 1, 0, 1, 0, 0, 0, 0, 1]; // the mirror x ↔ y
        Assert.Equal("D4h", SiteSymmetry.Name(Closure(c4z, c2x, inversion)));
        Assert.Equal("D3d", SiteSymmetry.Name(Closure(c3z, c2x, inversion)));
        Assert.Equal("Td", SiteSymmetry.Name(Closure(c3xyz, s4z, mxy)));
        Assert.Equal("D6h", SiteSymmetry.Name(Closure(c6z, c2x, mz)));
        Assert.Equal("S4", SiteSymmetry.Name(Closure(s4z)));
        Assert.Equal("Ci", SiteSymmetry.Name(Closure(inversion)));
        Assert.Equal("Cs", SiteSymmetry.Name(Closure(mz)));
        Assert.Equal("C1", SiteSymmetry.Name([identity]));
    }

    private static double[] Rotation(double angle) => [Math.Cos(angle), -Math.Sin(angle), 0, Math.Sin(angle), Math.Cos(angle), 0, 0, 0, 1];

    /// <summary>The group generated by the given matrices (products until nothing new appears).</summary>
    private static System.Collections.Generic.List<double[]> Closure(params double[][] generators)
    {
        var group = new System.Collections.Generic.List<double[]> { new double[] { 1, 0, 0, 0, 1, 0, 0, 0, 1 } };
        bool grew = true;
        while (grew)
        {
            grew = false;
            foreach (var a in group.ToList())
            {
                foreach (var g in generators)
                {
                    var p = new double[9];
                    for (int i = 0; i < 3; i++)
                    {
                        for (int j = 0; j < 3; j++)
                        {
                            for (int k = 0; k < 3; k++)
                            {
                                p[i * 3 + j] += a[i * 3 + k] * g[k * 3 + j];
                            }
                        }
                    }
                    if (!group.Any(m => m.Zip(p, (x, y) => Math.Abs(x - y)).Max() < 1e-9))
                    {
                        group.Add(p);
                        grew = true;
                    }
                }
            }
        }
        return group;
    }
}
