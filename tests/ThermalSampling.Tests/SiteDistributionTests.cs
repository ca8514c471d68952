using System;
using System.Linq;
using System.Runtime.Intrinsics;
using MathNet.Numerics;
using ThermalSampling.Analysis;
using ThermalSampling.Landscapes;
using ThermalSampling.Numerics;
using ThermalSampling.Potentials;
using ThermalSampling.Randomness;
using ThermalSampling.Reports;
using ThermalSampling.Sampling;
using ThermalSampling.Units;
using Xunit;

namespace ThermalSampling.Tests;

/// <summary>A site's distribution histograms: principal-axis marginals, radial density and projection.</summary>
public class SiteDistributionTests
{
    /// <summary>Six invented springs ½k(r − r0)² (k = 1 eV/Å², r0 = 1e−6 Å) to an octahedron 2 Å out: the isotropic well 3k|u|² (to 1e−6).</summary>
    private static SiteLandscape<HarmonicBond> HarmonicSite()
    {
        Position[] octahedron = [new(2, 0, 0), new(-2, 0, 0), new(0, 2, 0), new(0, -2, 0), new(0, 0, 2), new(0, 0, -2)];
        return SiteLandscape.Create(new HarmonicBond(1.0, Length.FromAngstroms(1e-6)), octahedron, Position.Origin, Confinement.Sphere(Length.FromAngstroms(1.0)));
    }

    private static double Phi(double x) => 0.5 * SpecialFunctions.Erfc(-x / Math.Sqrt(2));

    /// <summary>The CDF of |u| for an isotropic 3D Gaussian of standard deviation σ per axis (the Maxwell distribution; closed form).</summary>
    private static double MaxwellCdf(double r, double sigma)
        => SpecialFunctions.Erf(r / (sigma * Math.Sqrt(2))) - Math.Sqrt(2 / Math.PI) * (r / sigma) * Math.Exp(-r * r / (2 * sigma * sigma));

    /// <summary>
    /// The harmonic site's distribution is the Gaussian with U = kT/(6k)·I (closed form): every marginal bin against the
    /// normal CDF difference over the bin, the radial bins against the Maxwell CDF, and the projection's cells against the
    /// product of two normal bin probabilities, each within 4.5 standard errors (at most two of the 1024 cells and one bin
    /// per marginal beyond it); the densities integrate, with the share outside their range, to 1; the isotropic site is
    /// binned along the cube axes x, y, z.
    /// </summary>
    [Theory]
    [InlineData(SamplingMethod.Metropolis)]
    [InlineData(SamplingMethod.Direct)]
    public void A_harmonic_site_has_gaussian_marginals_a_maxwell_radial_density_and_a_gaussian_projection(SamplingMethod method)
    {
        var t = Temperature.FromKelvin(300);
        double sigma = Math.Sqrt(t.ThermalEnergyInElectronVolts / 6.0);
        var settings = new SamplingSettings { Seed = 9, Chains = 8, SamplesPerChain = 200_000, BurnIn = 5000, Method = method };
        var r = SiteSampler.Run(HarmonicSite(), Mass.FromAtomicMassUnits(20), t, settings);
        var d = r.Distribution;
        Assert.Equal([new Position(1, 0, 0), new Position(0, 1, 0), new Position(0, 0, 1)], d.PrincipalAxes.Select(a => new Position(Math.Round(a.X, 9), Math.Round(a.Y, 9), Math.Round(a.Z, 9))));
        Assert.True(d.Centre.Norm < 1e-6, $"centre {d.Centre}");
        for (int k = 0; k < 3; k++)
        {
            var h = d.Marginals[k];
            Assert.Equal(1.0, h.Density.Sum() * h.BinWidth + d.ShareOutsideMarginals[k], 12);
            int far = Enumerable.Range(0, h.Density.Length).Count(i =>
            {
                double a = h.Lower + i * h.BinWidth, expected = (Phi((a + h.BinWidth) / sigma) - Phi(a / sigma)) / h.BinWidth;
                return Math.Abs(h.Density[i] - expected) > 4.5 * h.DensityStandardError[i];
            });
            Assert.True(far <= 1, $"axis {k}: {far} bins beyond 4.5 SE");
        }
        var radial = d.Radial;
        Assert.Equal(1.0, radial.Density.Sum() * radial.BinWidth + d.ShareBeyondRadial, 12);
        Assert.True(Enumerable.Range(0, radial.Density.Length).Count(i =>
        {
            double a = i * radial.BinWidth, expected = (MaxwellCdf(a + radial.BinWidth, sigma) - MaxwellCdf(a, sigma)) / radial.BinWidth;
            return Math.Abs(radial.Density[i] - expected) > 4.5 * radial.DensityStandardError[i];
        }) <= 1);
        var p = d.Projection;
        double w1 = (p.FirstUpper - p.FirstLower) / p.Side, w2 = (p.SecondUpper - p.SecondLower) / p.Side;
        Assert.Equal(1.0, p.Density.Sum() * w1 * w2 + d.ShareOutsideProjection, 12);
        int farCells = 0;
        for (int i = 0; i < p.Side; i++)
        {
            for (int j = 0; j < p.Side; j++)
            {
                double a = p.FirstLower + i * w1, b = p.SecondLower + j * w2;
                double expected = (Phi((a + w1) / sigma) - Phi(a / sigma)) * (Phi((b + w2) / sigma) - Phi(b / sigma)) / (w1 * w2);
                farCells += Math.Abs(p.At(i, j) - expected) > 4.5 * p.DensityStandardError[i * p.Side + j] ? 1 : 0;
            }
        }
        Assert.True(farCells <= 2, $"{farCells} cells beyond 4.5 SE");
        Assert.DoesNotContain(r.Warnings, w => w.Code == WarningCodes.BeyondDistributionRange);
    }

    /// <summary>
    /// The range is a setting: at ±3 harmonic σ the harmonic site's marginals end at 3σ and hold all but 2(1 − Φ(3)) =
    /// 0.27 % of the draws (closed form), which the report states and warns about (above 0.1 %).
    /// </summary>
    [Fact]
    public void The_range_can_be_set_and_what_falls_beyond_it_is_reported()
    {
        var t = Temperature.FromKelvin(300);
        double sigma = Math.Sqrt(t.ThermalEnergyInElectronVolts / 6.0);
        var r = SiteSampler.Run(HarmonicSite(), Mass.FromAtomicMassUnits(20), t,
            new SamplingSettings { Seed = 10, Chains = 8, SamplesPerChain = 100_000, BurnIn = 5000, Method = SamplingMethod.Direct, SiteDistributionHalfWidthInSigmas = 3 });
        var d = r.Distribution;
        Assert.Equal(3 * sigma, d.Marginals[0].Upper, 1e-6);
        double expected = 2 * (1 - Phi(3));
        Assert.All(d.ShareOutsideMarginals, share => Assert.InRange(share, expected * 0.8, expected * 1.2));
        Assert.Contains(r.Warnings, w => w.Code == WarningCodes.BeyondDistributionRange);
        Assert.Contains("SiteDistributionHalfWidthInSigmas = 1 is out of range; valid: 2 to 100",
            Assert.Throws<ArgumentException>(() => new SamplingSettings { Seed = 1, SiteDistributionHalfWidthInSigmas = 1 }.Validate()).Message);
    }

    /// <summary>
    /// A three-fold hollow (an invented Lennard-Jones fcc(111) surface: 10.3 meV at 3.8 Å): its in-plane harmonic
    /// variances are equal, so the first two axes are the in-plane projections of x and y, and the third is the surface
    /// normal z; the centre lies above the minimum by the first-order shift (the softer vacuum side).
    /// </summary>
    [Fact]
    public void A_three_fold_hollow_is_binned_along_x_y_and_the_surface_normal()
    {
        var lj = LennardJones.FromMinimum(Length.FromAngstroms(3.8), Energy.FromElectronVolts(0.0103));
        var g = LatticeSites.Surface(LatticeKind.FaceCentredCubic, new MillerIndices(1, 1, 1), AdsorptionSiteKind.FccHollow, Length.FromAngstroms(3.8));
        var site = SiteLandscape.Create(lj, g.Sites, g.Start, Confinement.Sphere(Length.FromAngstroms(1.5)));
        var r = SiteSampler.Run(site, Mass.FromAtomicMassUnits(40), Temperature.FromKelvin(20),
            new SamplingSettings { Seed = 2, Chains = 4, SamplesPerChain = 20_000, BurnIn = 4000 });
        var axes = r.Distribution.PrincipalAxes;
        var normal = axes.Single(a => Math.Abs(Math.Abs(a.Z) - 1) < 1e-6);
        var inPlane = axes.Where(a => a != normal).ToArray();
        Assert.Equal(1.0, inPlane[0].X, 9);
        Assert.Equal(1.0, inPlane[1].Y, 9);
        Assert.True(r.Distribution.Centre.Z > r.Minimum.Z, "the predicted mean lies above the minimum");
    }

    /// <summary>The lane kernels' slot arithmetic equals the scalar one (<see cref="ShapeFrame.Slots3"/>) for points inside, at the edges of and beyond every range, at widths 1 and 8.</summary>
    [Fact]
    public void Lane_distribution_slots_equal_the_scalar_ones()
    {
        var frame = new ShapeFrame(new Position(0.1, -0.2, 0.05), [new(0.6, 0.8, 0), new(-0.8, 0.6, 0), new(0, 0, 1)], [0.3, 0.2, 0.1], 0.35, 24, ShapeFrame.SideFor(24));
        var random = RandomStream.FromSeed(3);
        var expected = new long[8 * frame.Slots];
        var counts8 = new long[8 * frame.Slots];
        var counts1 = new long[8 * frame.Slots];
        var lanes8 = new SiteLaneChains.LaneShape<Lanes8, Vector512<double>, Vector512<ulong>>(frame, counts8, 8);
        var index = new ulong[8];
        Span<int> slots = stackalloc int[5];
        for (int n = 0; n < 20_000; n++)
        {
            var x = new double[8];
            var y = new double[8];
            var z = new double[8];
            for (int lane = 0; lane < 8; lane++)
            {
                (x[lane], y[lane], z[lane]) = (0.1 + 0.8 * (random.NextUnitInterval() - 0.5), -0.2 + 0.8 * (random.NextUnitInterval() - 0.5), 0.05 + 0.4 * (random.NextUnitInterval() - 0.5));
                frame.Slots3(x[lane], y[lane], z[lane], slots);
                foreach (int s in slots)
                {
                    expected[lane * frame.Slots + s]++;
                }
                var single = new long[frame.Slots];
                new SiteLaneChains.LaneShape<Lanes1, double, ulong>(frame, single, 1).Count(x[lane], y[lane], z[lane], index);
                for (int s = 0; s < frame.Slots; s++)
                {
                    counts1[lane * frame.Slots + s] += single[s];
                }
            }
            lanes8.Count(Vector512.Create(x), Vector512.Create(y), Vector512.Create(z), index);
        }
        Assert.Equal(expected, counts8);
        Assert.Equal(expected, counts1);
        Assert.True(expected.Where((_, i) => i % frame.Slots == frame.ProjectionBase + frame.Side * frame.Side).Sum() > 0, "some points fell outside the projection");
        Assert.True(expected.Where((_, i) => i % frame.Slots == frame.MarginalBase(2)).Sum() > 0, "some points fell below a marginal");
    }
}
