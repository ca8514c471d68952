using System;
using System.Linq;
using MathNet.Numerics.Distributions;
using ThermalSampling.Analysis;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Reports;
using ThermalSampling.Sampling;
using ThermalSampling.Statistics;
using ThermalSampling.Units;
using Xunit;

namespace ThermalSampling.Tests;

/// <summary>
/// Third and fourth cumulants: the estimator on draws of known cumulants, the line and radial samplers against exact
/// quadrature, and the site samplers' lane and direct paths against each other.
/// </summary>
public class CumulantTests
{
    /// <summary>
    /// Independent coordinates: x exponential with rate 2 (κ3 = 2/λ³ = 0.25, κ4 = 6/λ⁴ = 0.375: the exponential's cumulants
    /// κn = (n − 1)!/λⁿ, closed form), y and z standard normal (all their cumulants above the second vanish). Every mixed
    /// cumulant vanishes for independent coordinates. Each of the 25 components must lie within 4.5 jackknife errors of its
    /// value, and the errors must be about right: their mean squared z-score within [0.3, 2.5].
    /// </summary>
    [Fact]
    public void The_estimator_recovers_known_cumulants_with_calibrated_errors()
    {
        const int chains = 4, draws = 200_000;
        var random = new Random(5);
#pragma warning disable CA5394 // test data, not security
        var records = Enumerable.Range(0, chains).Select(_ => new CumulantSums(3, draws, [])).ToList();
        var exponential = new Exponential(2.0, random);
        foreach (var record in records)
        {
            for (int i = 0; i < draws; i++)
            {
                record.Add(i, [exponential.Sample() - 0.5, Normal.Sample(random, 0, 1), Normal.Sample(random, 0, 1)]);
            }
        }
#pragma warning restore CA5394
        var estimate = CumulantEstimate.From(records);
        Assert.Equal(chains * 25, estimate.Groups); // 200 000 draws in groups of 8192
        double Expected3(int[] t) => t.All(i => i == 0) ? 0.25 : 0;
        double Expected4(int[] t) => t.All(i => i == 0) ? 0.375 : 0;
        var z = CumulantSums.Third.Select((t, k) => (estimate.Third[k] - Expected3(t)) / estimate.ThirdStandardError[k])
            .Concat(CumulantSums.Fourth.Select((t, k) => (estimate.Fourth[k] - Expected4(t)) / estimate.FourthStandardError[k])).ToArray();
        Assert.All(z, v => Assert.InRange(v, -4.5, 4.5));
        Assert.InRange(z.Average(v => v * v), 0.3, 2.5);
    }

    /// <summary>
    /// Line and radial pairs: the sampled κ3 and κ4 of the separation agree with exact quadrature (the same quadrature as the
    /// other exact moments, MathNet Gauss–Kronrod) within 4 standard errors, at three temperatures. Invented Morse well
    /// (0.5 eV, 1.5/Å, 2.5 Å).
    /// </summary>
    [Theory]
    [InlineData("line")]
    [InlineData("radial")]
    public void Pair_cumulants_agree_with_exact_quadrature(string geometry)
    {
        var morse = new Morse(Energy.FromElectronVolts(0.5), 1.5, Length.FromAngstroms(2.5));
        var landscape = geometry == "line"
            ? PairLandscape.Line(morse, Length.FromAngstroms(1.9), Length.FromAngstroms(4.5))
            : PairLandscape.Radial(morse, Length.FromAngstroms(1.9), Length.FromAngstroms(4.5));
        var settings = new SamplingSettings { Seed = 12, Chains = 4, SamplesPerChain = 200_000, BurnIn = 5000 };
        foreach (double kelvin in new[] { 150.0, 600.0, 1500.0 })
        {
            var r = PairSampler.Run(landscape, Mass.FromAtomicMassUnits(30), Temperature.FromKelvin(kelvin), settings);
            Assert.InRange((r.ThirdCumulant.Value - r.Exact.ThirdCumulant) / r.ThirdCumulant.StandardError, -4, 4);
            Assert.InRange((r.FourthCumulant.Value - r.Exact.FourthCumulant) / r.FourthCumulant.StandardError, -4, 4);
            Assert.True(r.Exact.ThirdCumulant > 0, "a Morse well is softer outwards: κ3 > 0");
        }
    }

    /// <summary>
    /// A site's cumulant tensors from the lane kernels (Metropolis) and from independent direct draws agree within their
    /// combined errors, component by component (|z| below 4.5 for all 25); for the fcc cage, whose site has a centre of
    /// symmetry, every third cumulant is zero within 4.5 errors. Invented cage (12 Lennard-Jones neighbours, 10 meV at
    /// 3.5 Å), 60 K.
    /// </summary>
    [Fact]
    public void Site_cumulants_agree_between_lane_and_direct_sampling_and_vanish_at_third_order_at_a_centre_of_symmetry()
    {
        var cage = InventedLandscapes.Cage;
        var settings = new SamplingSettings { Seed = 3, Chains = 8, SamplesPerChain = 150_000, BurnIn = 5000 };
        var t = Temperature.FromKelvin(60);
        var lanes = SiteSampler.Run(cage, Mass.FromAtomicMassUnits(40), t, settings);
        var direct = SiteSampler.Run(cage, Mass.FromAtomicMassUnits(40), t, settings with { Method = SamplingMethod.Direct, SamplesPerChain = 60_000 });
        Assert.Equal(10, lanes.ThirdCumulants.Length);
        Assert.Equal(15, lanes.FourthCumulants.Length);
        static double Z(Estimate a, Estimate b) => (a.Value - b.Value) / Math.Sqrt(a.StandardError * a.StandardError + b.StandardError * b.StandardError);
        Assert.All(lanes.ThirdCumulants.Zip(direct.ThirdCumulants, Z).Concat(lanes.FourthCumulants.Zip(direct.FourthCumulants, Z)),
            z => Assert.InRange(z, -4.5, 4.5));
        Assert.All(lanes.ThirdCumulants, k => Assert.InRange(k.Value / k.StandardError, -4.5, 4.5));
        // The cage is cubic: the fourth cumulant is not zero (the well is anharmonic) and κ1111 = κ2222 = κ3333 within error.
        var k1111 = lanes.FourthCumulants[0];
        Assert.True(Math.Abs(k1111.Value) > 4 * k1111.StandardError, "the anharmonic cage has a fourth cumulant");
        Assert.InRange(Z(k1111, lanes.FourthCumulants[10]), -4.5, 4.5);
        Assert.InRange(Z(k1111, lanes.FourthCumulants[14]), -4.5, 4.5);
    }
}

/// <summary>The exact generalised temperature factor of a pair.</summary>
public class TemperatureFactorTests
{
    /// <summary>
    /// A harmonic bond on a wide line window is Gaussian: T(q) = exp(−q²σ²/2) with no imaginary part (closed form), at q
    /// from 0 to 20 1/Å. An asymmetric Morse well has Im T(q) ≈ −κ3 q³/6 at small q (the cumulant expansion), and
    /// |T(q)| ≤ 1 everywhere.
    /// </summary>
    [Fact]
    public void The_exact_temperature_factor_is_gaussian_for_a_harmonic_bond_and_skewed_for_a_morse_well()
    {
        var bond = new HarmonicBond(2.0, Length.FromAngstroms(1.5));
        var t = Temperature.FromKelvin(300);
        double sigma = Math.Sqrt(t.ThermalEnergyInElectronVolts / 2.0);
        var exact = ExactPairDistribution.Compute(PairLandscape.Line(bond, Length.FromAngstroms(1.5 - 10 * sigma), Length.FromAngstroms(1.5 + 10 * sigma)), t);
        foreach (double q in new[] { 0.0, 1, 5, 10, 20 })
        {
            var (re, im) = exact.TemperatureFactor(q);
            Assert.Equal(Math.Exp(-q * q * sigma * sigma / 2), re, 8);
            Assert.Equal(0, im, 8);
        }
        var morse = new Morse(Energy.FromElectronVolts(0.5), 1.5, Length.FromAngstroms(2.5));
        var skewed = ExactPairDistribution.Compute(PairLandscape.Line(morse, Length.FromAngstroms(1.9), Length.FromAngstroms(4.5)), Temperature.FromKelvin(600));
        double s = Math.Sqrt(skewed.VarianceInAngstromsSquared), k3 = skewed.Skewness * s * s * s;
        // At q = 0.1 1/Å the next terms (the Gaussian damping σ²q²/2 and κ5 q⁵/120) change Im T by well under 1 %.
        const double small = 0.1;
        double leading = -k3 * small * small * small / 6;
        Assert.Equal(leading, skewed.TemperatureFactor(small).Imaginary, 0.01 * Math.Abs(leading));
        Assert.All(new[] { 0.5, 3.0, 15.0 }, q => Assert.True(Math.Sqrt(Math.Pow(skewed.TemperatureFactor(q).Real, 2) + Math.Pow(skewed.TemperatureFactor(q).Imaginary, 2)) <= 1 + 1e-12));
        Assert.Throws<ArgumentOutOfRangeException>(() => skewed.TemperatureFactor(2000));
    }
}

/// <summary>The densities set beside the sampled histogram, and the component labels of the reports.</summary>
public class DistributionTests
{
    /// <summary>
    /// A harmonic bond on a ±10σ line window is Gaussian (closed form: the normal distribution N(r0, kT/k), less under
    /// 1e-20 of it beyond the walls), so on every bin the exact density (quadrature over the bin) and the harmonic Gaussian
    /// (normal CDF differences) both equal the closed-form bin average Φ-difference/width.
    /// </summary>
    [Fact]
    public void Exact_and_harmonic_bin_densities_equal_the_closed_form_for_a_harmonic_bond()
    {
        var bond = new HarmonicBond(2.0, Length.FromAngstroms(1.5));
        var t = Temperature.FromKelvin(300);
        double sigma = Math.Sqrt(t.ThermalEnergyInElectronVolts / 2.0);
        var line = PairLandscape.Line(bond, Length.FromAngstroms(1.5 - 10 * sigma), Length.FromAngstroms(1.5 + 10 * sigma));
        var r = PairSampler.Run(line, Mass.FromAtomicMassUnits(20), t, new SamplingSettings { Seed = 4, Chains = 2, SamplesPerChain = 1000, BurnIn = 100 });
        var gauss = new Normal(1.5, sigma);
        var h = r.Histogram;
        for (int i = 0; i < h.Density.Length; i++)
        {
            double a = h.Lower + i * h.BinWidth, b = a + h.BinWidth;
            double expected = (gauss.CumulativeDistribution(b) - gauss.CumulativeDistribution(a)) / h.BinWidth;
            Assert.Equal(expected, r.ExactBinDensity[i], 1e-8 * (1 + expected));
            Assert.Equal(expected, r.HarmonicBinDensity[i], 1e-8 * (1 + expected));
        }
    }

    [Fact]
    public void Component_labels_follow_the_documented_order()
    {
        Assert.Equal(["11", "12", "13", "22", "23", "33"], TensorComponents.Second.ToArray());
        Assert.Equal(["111", "112", "113", "122", "123", "133", "222", "223", "233", "333"], TensorComponents.Third.ToArray());
        Assert.Equal(["1111", "1112", "1113", "1122", "1123", "1133", "1222", "1223", "1233", "1333", "2222", "2223", "2233", "2333", "3333"], TensorComponents.Fourth.ToArray());
    }
}
