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
        Assert.Equal([0, -1, -1, 0, -1, 5], s.CovarianceForm.ToArray());
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
        Assert.Equal(Enumerable.Range(0, 10), s.ThirdForm);
    }
}
