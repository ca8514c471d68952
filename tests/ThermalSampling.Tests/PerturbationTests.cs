using System;
using System.Linq;
using ThermalSampling.Analysis;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Reports;
using ThermalSampling.Sampling;
using ThermalSampling.Units;
using Xunit;

namespace ThermalSampling.Tests;

/// <summary>
/// The leading anharmonic terms (docs/perturbation-theory.md): the fourth-derivative tensor against finite differences,
/// the general formulas in one dimension against exact quadrature as T → 0, and in three dimensions against sampling.
/// </summary>
public class PerturbationTests
{
    private static readonly LennardJones Pair = InventedLandscapes.Pair;

    /// <summary>∂⁴E equals the central difference of the analytic third-derivative tensor (step 1e-4 Å, error O(h²)).</summary>
    [Fact]
    public void The_fourth_derivative_tensor_is_the_derivative_of_the_third()
    {
        var landscape = InventedLandscapes.Cage;
        var p = new Position(0.11, -0.07, 0.05); // off the symmetric point, so that every component is exercised
        var f = landscape.FourthDerivatives(p);
        const double h = 1e-4;
        for (int l = 0; l < 3; l++)
        {
            var step = new Position(l == 0 ? h : 0, l == 1 ? h : 0, l == 2 ? h : 0);
            var plus = landscape.ThirdDerivatives(p + step);
            var minus = landscape.ThirdDerivatives(p - step);
            for (int i = 0; i < 3; i++)
            {
                for (int j = 0; j < 3; j++)
                {
                    for (int k = 0; k < 3; k++)
                    {
                        double numeric = (plus[i, j, k] - minus[i, j, k]) / (2 * h);
                        Assert.True(Math.Abs(f[i, j, k, l] - numeric) <= 1e-5 * (1 + Math.Abs(numeric)), $"[{i}{j}{k}{l}]: {f[i, j, k, l]} against {numeric}");
                    }
                }
            }
        }
    }

    /// <summary>
    /// In one dimension the general formulas reduce to the textbook ones: κ3 = −V3(kT)²/k³ (validation-sources.md), and
    /// the variance correction (kT)²[V3²/k⁴ − V4/(2k³)]; κ4 = (kT)³[3V3²/k⁵ − V4/k⁴] follows. Each is checked as T → 0
    /// against exact quadrature of an invented Morse line: (exact − harmonic part)/Tⁿ must approach the perturbative
    /// coefficient, the relative gap shrinking at least in proportion to T between 20 K and 5 K.
    /// </summary>
    [Fact]
    public void One_dimension_matches_exact_quadrature_as_the_temperature_falls()
    {
        var morse = new Morse(Energy.FromElectronVolts(0.5), 1.5, Length.FromAngstroms(2.5));
        var landscape = PairLandscape.Line(morse, Length.FromAngstroms(2.0), Length.FromAngstroms(4.0));
        var dv = morse.Derivatives(2.5);
        double Gap(double kelvin, int which)
        {
            var t = Temperature.FromKelvin(kelvin);
            double kT = t.ThermalEnergyInElectronVolts;
            var (dc, k3, k4) = Perturbation.Leading(new double[,] { { dv.Second } }, [dv.Third], [dv.Fourth], 1, kT);
            var exact = ExactPairDistribution.Compute(landscape, t);
            double sigma = Math.Sqrt(exact.VarianceInAngstromsSquared);
            double exactValue = which switch
            {
                0 => exact.VarianceInAngstromsSquared - kT / dv.Second,
                1 => exact.Skewness * sigma * sigma * sigma,
                _ => exact.ExcessKurtosis * sigma * sigma * sigma * sigma,
            };
            double predicted = which switch { 0 => dc[0, 0], 1 => k3[0], _ => k4[0] };
            return Math.Abs(exactValue / predicted - 1);
        }
        foreach (int which in new[] { 0, 1, 2 })
        {
            double at20 = Gap(20, which), at5 = Gap(5, which);
            Assert.True(at5 < 0.02, $"quantity {which}: relative gap {at5} at 5 K");
            Assert.True(at5 < 0.5 * at20 + 1e-4, $"quantity {which}: the gap does not shrink ({at20} at 20 K, {at5} at 5 K)");
        }
        // The textbook closed forms, at one temperature.
        double kt = Temperature.FromKelvin(10).ThermalEnergyInElectronVolts, k = dv.Second, v3 = dv.Third, v4 = dv.Fourth;
        var (c, t3, t4) = Perturbation.Leading(new double[,] { { k } }, [v3], [v4], 1, kt);
        Assert.Equal(kt * kt * (v3 * v3 / (k * k * k * k) - v4 / (2 * k * k * k)), c[0, 0], 12);
        Assert.Equal(-v3 * kt * kt / (k * k * k), t3[0], 12);
        Assert.Equal(kt * kt * kt * (3 * v3 * v3 / Math.Pow(k, 5) - v4 / Math.Pow(k, 4)), t4[0], 12);
    }

    /// <summary>
    /// In three dimensions, for the invented fcc cage at 15 K, the sampled fourth cumulants and covariance agree with the
    /// leading perturbative terms (κ4 within 4.5 errors plus 15 % of the prediction, which is what the next order can
    /// add at this temperature), and every third cumulant is zero by symmetry in both.
    /// </summary>
    [Fact]
    public void Three_dimensions_match_sampling_at_low_temperature()
    {
        var cage = InventedLandscapes.Cage;
        var t = Temperature.FromKelvin(15);
        var report = SiteSampler.Run(cage, Mass.FromAtomicMassUnits(40), t,
            new SamplingSettings { Seed = 8, Chains = 8, SamplesPerChain = 300_000, BurnIn = 5000 });
        var p = report.Perturbative;
        Assert.All(p.ThirdCumulants, k3 => Assert.True(Math.Abs(k3) < 1e-12, "a centre of symmetry makes κ3 vanish"));
        for (int c = 0; c < 15; c++)
        {
            var sampled = report.FourthCumulants[c];
            Assert.True(Math.Abs(sampled.Value - p.FourthCumulants[c]) <= 4.5 * sampled.StandardError + 0.15 * Math.Abs(p.FourthCumulants[c]),
                $"κ4 component {c}: sampled {sampled.Value:G4} ± {sampled.StandardError:G2}, perturbative {p.FourthCumulants[c]:G4}");
        }
        Assert.True(p.FourthCumulants[0] > 0 || p.FourthCumulants[0] < 0, "the cage's κ1111 is not zero");
        // The covariance correction: the sampled variance beyond the harmonic one, against ΔU, along x.
        double excess = report.Covariance.XX - report.Harmonic.ClassicalCovariance.XX;
        double se = report.MeanSquareDisplacement.StandardError; // a generous stand-in for the error of one diagonal element
        Assert.True(Math.Abs(excess - p.CovarianceCorrection.XX) <= 4.5 * se + 0.15 * Math.Abs(p.CovarianceCorrection.XX),
            $"ΔU_xx: sampled {excess:G4} ± {se:G2}, perturbative {p.CovarianceCorrection.XX:G4}");
    }

    /// <summary>
    /// Convergence as T → 0 in three dimensions, for the invented fcc cage (at 10, 20 and 40 K) and an invented fcc(111)
    /// hollow (Lennard-Jones, 10 meV at 3.5 Å; far more anharmonic in the plane, so at 2.5, 5 and 10 K): the leading terms
    /// are of order Tⁿ (the cage's κ1111, n = 3; the hollow's κ333, n = 2; the excess of the mean-square displacement over
    /// the harmonic one against tr ΔU, n = 2), so (sampled − perturbative)/Tⁿ must vanish as T → 0, the relative gap
    /// (sampled − perturbative)/perturbative shrinking in proportion to T: from the highest temperature to the lowest (a
    /// quarter of it) it must fall at least by half, within three of its standard errors, and be below 25 % at the lowest.
    /// </summary>
    [Theory]
    [InlineData("cage")]
    [InlineData("hollow")]
    public void Three_dimensions_converge_to_the_leading_terms_as_the_temperature_falls(string which)
    {
        var site = which == "cage"
            ? InventedLandscapes.Cage
            : SiteLandscape.AboveSurface(InventedLandscapes.Pair,
                LatticeSites.Surface(LatticeKind.FaceCentredCubic, new MillerIndices(1, 1, 1), AdsorptionSiteKind.FccHollow, Length.FromAngstroms(3.5)),
                Confinement.Sphere(Length.FromAngstroms(1.0)));
        double lowest = which == "cage" ? 10 : 2.5;
        var settings = new SamplingSettings { Seed = 44, Chains = 8, SamplesPerChain = 1_000_000, BurnIn = 10_000 };
        int component = which == "cage" ? 0 : 9; // κ1111 of the cage, κ333 of the hollow
        var gaps = new System.Collections.Generic.List<(double Gap, double Error)>[2] { new(), new() };
        foreach (double kelvin in new[] { lowest, 2 * lowest, 4 * lowest })
        {
            var r = SiteSampler.Run(site, Mass.FromAtomicMassUnits(40), Temperature.FromKelvin(kelvin), settings);
            var p = r.Perturbative;
            var sampled = which == "cage" ? r.FourthCumulants[component] : r.ThirdCumulants[component];
            double predicted = which == "cage" ? p.FourthCumulants[component] : p.ThirdCumulants[component];
            gaps[0].Add((sampled.Value / predicted - 1, sampled.StandardError / Math.Abs(predicted)));
            double excess = r.MeanSquareDisplacement.Value - r.Harmonic.ClassicalMeanSquareDisplacement, predictedExcess = p.CovarianceCorrection.Trace;
            gaps[1].Add((excess / predictedExcess - 1, r.MeanSquareDisplacement.StandardError / Math.Abs(predictedExcess)));
        }
        foreach (var (series, name) in gaps.Zip(new[] { "leading cumulant", "MSD excess" }))
        {
            var (low, high) = (series[0], series[2]);
            string text = string.Join(", ", series.Select(x => $"{x.Gap:P1} ± {x.Error:P1}"));
            Assert.True(Math.Abs(low.Gap) <= 0.5 * Math.Abs(high.Gap) + 3 * (low.Error + high.Error), $"{which}, {name}: relative gaps {text} do not shrink with T");
            Assert.True(Math.Abs(low.Gap) <= 0.25 + 3 * low.Error, $"{which}, {name}: relative gap {low.Gap:P1} ± {low.Error:P1} at {lowest} K");
        }
    }
}
