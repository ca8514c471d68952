using System;
using System.Linq;
using FsCheck;
using FsCheck.Fluent;
using FsCheck.Xunit;
using MathNet.Numerics.Integration;
using ThermalSampling.Analysis;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Units;
using Xunit;

namespace ThermalSampling.Tests;

public class AnalysisTests
{
    private static readonly Mass ArgonMass = Mass.FromAtomicMassUnits(39.948);
    private static readonly LennardJones Lj = LennardJones.FromMinimum(Length.FromAngstroms(3.8), Energy.FromKelvin(119.8)); // Sources.Argon (eps), r0 rounded
    private static readonly Morse Iron = new(Energy.FromElectronVolts(0.4174), 1.3885, Length.FromAngstroms(2.845)); // Sources.GirifalcoWeizer (Fe)
    private static readonly Buckingham OxygenOxygen = new(Energy.FromElectronVolts(22764.0), Length.FromAngstroms(0.149), 27.88); // Sources.Buckingham

    private static Temperature K(double kelvin) => Temperature.FromKelvin(kelvin);

    [Fact]
    public void Harmonic_bond_on_a_line_is_an_exact_Gaussian()
    {
        // Closed form: p(x) ∝ exp(-k x²/2kT) is a Gaussian of variance kT/k; skewness and excess kurtosis 0.
        var bond = new HarmonicBond(2.0, Length.FromAngstroms(2.0));
        var landscape = PairLandscape.Line(bond, Length.FromAngstroms(1.0), Length.FromAngstroms(3.0));
        var t = K(300);
        double variance = t.ThermalEnergyInElectronVolts / 2.0;
        var exact = ExactPairDistribution.Compute(landscape, t);
        Assert.Equal(2.0, exact.MeanInAngstroms, 12);
        Assert.Equal(variance, exact.VarianceInAngstromsSquared, 13);
        Assert.Equal(0.0, exact.Skewness, 9);
        Assert.Equal(0.0, exact.ExcessKurtosis, 9);
        var first = PairAnalysis.FirstOrder(landscape, t);
        Assert.Equal(0.0, first.MeanShiftInAngstroms);
        Assert.Equal(variance, first.VarianceInAngstromsSquared, 15);
        Assert.Equal(0.0, first.ThirdCumulantInAngstromsCubed);
        Assert.Equal(variance, PairAnalysis.Harmonic(landscape, ArgonMass, t).ClassicalVarianceInAngstromsSquared, 15);
        // The CDF is MathNet's Normal CDF (independent reference library).
        var normal = new MathNet.Numerics.Distributions.Normal(2.0, Math.Sqrt(variance));
        foreach (double r in new[] { 1.9, 1.97, 2.0, 2.05, 2.2 })
        {
            Assert.Equal(normal.CumulativeDistribution(r), exact.CumulativeProbability(r), 10);
            Assert.Equal(normal.Density(r), exact.Density(r), 8);
        }
        // Within one RMS spread σ of the walls at 1 and 3 Å: the Normal probability of [1, 1 + σ] and [3 − σ, 3] (MathNet),
        // with σ the truncated distribution's own spread.
        double sigma = exact.RmsInAngstroms;
        double band = normal.CumulativeDistribution(1.0 + sigma) - normal.CumulativeDistribution(1.0);
        Assert.True(Math.Abs(exact.ProbabilityNearLowerWall - band) < 1e-6 * band, $"near the lower wall {exact.ProbabilityNearLowerWall} vs {band}");
        Assert.True(Math.Abs(exact.ProbabilityNearWalls - 2 * band) < 1e-6 * 2 * band, $"near the walls {exact.ProbabilityNearWalls} vs {2 * band}");
    }

    [Fact]
    public void Morse_first_order_mean_shift_is_three_kT_over_four_D_a()
    {
        // Source: Sources.ClassicalPerturbation (Morse: <x> = 3kT/(4Da)); Fe parameters from Sources.GirifalcoWeizer.
        var landscape = PairLandscape.Line(Iron, Length.FromAngstroms(2.0), Length.FromAngstroms(5.0));
        var t = K(100);
        double expected = 3 * t.ThermalEnergyInElectronVolts / (4 * 0.4174 * 1.3885);
        Assert.Equal(expected, PairAnalysis.FirstOrder(landscape, t).MeanShiftInAngstroms, 14);
    }

    [Fact]
    public void Lennard_Jones_first_order_mean_shift_is_seven_48ths_r0_kT_over_u0()
    {
        // Source: Sources.ClassicalPerturbation (LJ: <x> = (7/48) r0 kT/u0).
        var landscape = PairLandscape.Line(Lj, Length.FromAngstroms(3.0), Length.FromAngstroms(8.0));
        var t = K(10);
        double u0 = Energy.FromKelvin(119.8).InElectronVolts;
        Assert.Equal(7.0 / 48 * 3.8 * t.ThermalEnergyInElectronVolts / u0, PairAnalysis.FirstOrder(landscape, t).MeanShiftInAngstroms, 13);
    }

    [Fact]
    public void Line_perturbation_third_cumulant_matches_the_closed_form()
    {
        // Source: Sources.ClassicalPerturbation (third cumulant -V3 (kT)^2/k^3).
        var landscape = PairLandscape.Line(Iron, Length.FromAngstroms(2.0), Length.FromAngstroms(5.0));
        var t = K(50);
        double kt = t.ThermalEnergyInElectronVolts, k = 2 * 0.4174 * 1.3885 * 1.3885, v3 = -6 * 0.4174 * Math.Pow(1.3885, 3);
        Assert.Equal(-v3 * kt * kt / (k * k * k), PairAnalysis.FirstOrder(landscape, t).ThirdCumulantInAngstromsCubed, 15);
    }

    public static TheoryData<string, SeparationGeometry> Cases => new()
    {
        { "lj", SeparationGeometry.Line }, { "lj", SeparationGeometry.Radial },
        { "morse", SeparationGeometry.Line }, { "morse", SeparationGeometry.Radial },
        { "buckingham", SeparationGeometry.Line }, { "buckingham", SeparationGeometry.Radial },
    };

    private static (Func<Temperature, ExactPairDistribution> Exact, Func<Temperature, PairFirstOrderEstimate> First, double R0, double Tmax) Build(string name, SeparationGeometry g)
    {
        switch (name)
        {
            case "lj":
            {
                var l = PairLandscape.Create(Lj, g, Length.FromAngstroms(3.0), Length.FromAngstroms(6.0));
                return (t => ExactPairDistribution.Compute(l, t), t => PairAnalysis.FirstOrder(l, t), 3.8, 8);
            }
            case "morse":
            {
                var l = PairLandscape.Create(Iron, g, Length.FromAngstroms(2.0), Length.FromAngstroms(5.0));
                return (t => ExactPairDistribution.Compute(l, t), t => PairAnalysis.FirstOrder(l, t), 2.845, 80);
            }
            default:
            {
                var l = PairLandscape.Create(OxygenOxygen, g, Length.FromAngstroms(OxygenOxygen.BarrierDistanceInAngstroms + 0.1), Length.FromAngstroms(2.5));
                return (t => ExactPairDistribution.Compute(l, t), t => PairAnalysis.FirstOrder(l, t), OxygenOxygen.Well!.EquilibriumDistanceInAngstroms, 80);
            }
        }
    }

    [Theory]
    [MemberData(nameof(Cases))]
    public void Exact_minus_first_order_shrinks_like_T_squared(string name, SeparationGeometry geometry)
    {
        // Sources.ClassicalPerturbation (line) and Sources.RadialPerturbation (radial): the first-order formulas are right to the
        // order claimed iff (exact − first order)/T² tends to a constant as T → 0 (mean: O(T²) remainder; variance: O(T³)).
        var (exact, first, r0, tMax) = Build(name, geometry);
        double[] temperatures = { tMax, tMax / 2, tMax / 4, tMax / 8 };
        var meanRatios = temperatures.Select(t => (exact(K(t)).MeanInAngstroms - r0 - first(K(t)).MeanShiftInAngstroms) / (t * t)).ToArray();
        var varRatios = temperatures.Select(t => (exact(K(t)).VarianceInAngstromsSquared - first(K(t)).VarianceInAngstromsSquared) / (t * t * t)).ToArray();
        // Successive ratios converge: the differences between halvings shrink geometrically (by about 2 each time).
        for (int i = 2; i < temperatures.Length; i++)
        {
            Assert.True(Math.Abs(meanRatios[i] - meanRatios[i - 1]) < 0.7 * Math.Abs(meanRatios[i - 1] - meanRatios[i - 2]) + 1e-12 * Math.Abs(meanRatios[i]),
                $"mean: {string.Join(", ", meanRatios)}");
            Assert.True(Math.Abs(varRatios[i] - varRatios[i - 1]) < 0.7 * Math.Abs(varRatios[i - 1] - varRatios[i - 2]) + 1e-12 * Math.Abs(varRatios[i]),
                $"variance: {string.Join(", ", varRatios)}");
        }
        // And the first-order prediction captures most of the shift at the lowest temperature.
        double tLow = temperatures[^1];
        double exactShift = exact(K(tLow)).MeanInAngstroms - r0;
        Assert.True(Math.Abs(exactShift - first(K(tLow)).MeanShiftInAngstroms) < 0.1 * Math.Abs(exactShift), $"{exactShift} vs {first(K(tLow)).MeanShiftInAngstroms}");
    }

    [Theory]
    [MemberData(nameof(Cases))]
    public void Quadrature_agrees_with_an_independent_composite_Gauss_Legendre_rule(string name, SeparationGeometry geometry)
    {
        // Cross-check with MathNet's fixed-order Gauss–Legendre rule on 4000 equal panels: independent of the
        // adaptive Gauss–Kronrod scheme and its break points.
        var (exact, _, _, tMax) = Build(name, geometry);
        var d = exact(K(tMax));
        double lo = d.WindowLowerInAngstroms, hi = d.WindowUpperInAngstroms;
        const int panels = 4000;
        double Moment(Func<double, double> f)
        {
            double sum = 0, h = (hi - lo) / panels;
            for (int i = 0; i < panels; i++)
            {
                sum += GaussLegendreRule.Integrate(f, lo + i * h, lo + (i + 1) * h, 10);
            }
            return sum;
        }
        double z = Moment(d.Density);
        double mean = Moment(r => r * d.Density(r)) / z;
        double variance = Moment(r => (r - mean) * (r - mean) * d.Density(r)) / z;
        double m3 = Moment(r => Math.Pow(r - mean, 3) * d.Density(r)) / z;
        Assert.Equal(1.0, z, 10);
        Assert.Equal(mean, d.MeanInAngstroms, 11);
        Assert.True(Math.Abs(variance - d.VarianceInAngstromsSquared) < 1e-9 * variance);
        Assert.True(Math.Abs(m3 - d.ThirdCentralMomentInAngstromsCubed) < 1e-7 * Math.Pow(variance, 1.5));
    }

    [Fact]
    public void Radial_Jacobian_pushes_the_mean_outwards_by_about_two_kT_over_k_r0()
    {
        // Sources.RadialPerturbation: the difference between radial and line first-order shifts is 2kT/(k r0).
        var line = PairLandscape.Line(Iron, Length.FromAngstroms(2.0), Length.FromAngstroms(5.0));
        var radial = PairLandscape.Radial(Iron, Length.FromAngstroms(2.0), Length.FromAngstroms(5.0));
        var t = K(20);
        double k = 2 * 0.4174 * 1.3885 * 1.3885;
        double predicted = 2 * t.ThermalEnergyInElectronVolts / (k * 2.845);
        double exactDifference = ExactPairDistribution.Compute(radial, t).MeanInAngstroms - ExactPairDistribution.Compute(line, t).MeanInAngstroms;
        Assert.Equal(predicted, PairAnalysis.FirstOrder(radial, t).MeanShiftInAngstroms - PairAnalysis.FirstOrder(line, t).MeanShiftInAngstroms, 15);
        Assert.True(Math.Abs(exactDifference - predicted) < 0.02 * predicted, $"{exactDifference} vs {predicted}");
    }

    [Fact]
    public void Rms_spread_follows_the_square_root_of_temperature_in_the_harmonic_limit_and_departs_from_it_when_anharmonic()
    {
        // Source: Sources.SqrtT. Exact quadrature over five temperatures spanning a factor of 16: the slope of log RMS against
        // log T is 1/2 where anharmonicity is negligible (0.5–8 K in a 0.42 eV Morse well) and measurably steeper where it is
        // not (300–4800 K), so the fit can tell the law from its failure.
        var landscape = PairLandscape.Line(Iron, Length.FromAngstroms(2.0), Length.FromAngstroms(5.0));
        double Slope(double[] kelvins) => MathNet.Numerics.Fit.Line(
            kelvins.Select(k => Math.Log(k)).ToArray(),
            kelvins.Select(k => Math.Log(ExactPairDistribution.Compute(landscape, K(k)).RmsInAngstroms)).ToArray()).B;
        double cold = Slope([0.5, 1, 2, 4, 8]);
        double hot = Slope([300, 600, 1200, 2400, 4800]);
        Assert.InRange(cold, 0.5 - 1e-3, 0.5 + 1e-3);
        Assert.True(hot > 0.5 + 0.02, $"slope {hot} over 300–4800 K should exceed 1/2 (anharmonic softening)");
    }

    private static Arbitrary<(double Scale, int Temperature)> Scales() =>
        (from s in Gen.Choose(1, 400) from t in Gen.Choose(5, 150) select (s / 40.0, t)).ToArbitrary();

    [Property(MaxTest = 25)]
    public Property Scaling_energies_and_kT_together_leaves_the_distribution_unchanged() => Prop.ForAll(Scales(), p =>
    {
        // Only V/kT enters the Boltzmann weight (common practice, no source).
        var baseMorse = new Morse(Energy.FromElectronVolts(0.3), 1.4, Length.FromAngstroms(2.9));
        var scaled = new Morse(Energy.FromElectronVolts(0.3 * p.Scale), 1.4, Length.FromAngstroms(2.9));
        var a = ExactPairDistribution.Compute(PairLandscape.Radial(baseMorse, Length.FromAngstroms(2.2), Length.FromAngstroms(4.5)), K(p.Temperature));
        var b = ExactPairDistribution.Compute(PairLandscape.Radial(scaled, Length.FromAngstroms(2.2), Length.FromAngstroms(4.5)), K(p.Temperature * p.Scale));
        return Math.Abs(a.MeanInAngstroms - b.MeanInAngstroms) < 1e-10
            && Math.Abs(a.VarianceInAngstromsSquared - b.VarianceInAngstromsSquared) < 1e-9 * a.VarianceInAngstromsSquared;
    });

    [Fact]
    public void Quantum_harmonic_variance_follows_coth_and_its_limits()
    {
        // Sources.QuantumOscillator and Sources.WignerKirkwood.
        double k = 2 * 0.4174 * 1.3885 * 1.3885; // Fe Morse curvature
        var m = Mass.FromAtomicMassUnits(55.845);
        foreach (double t in new[] { 5.0, 50, 300, 3000 })
        {
            var h = HarmonicOscillator.Estimate(2.845, k, m.InAtomicMassUnits, K(t).ThermalEnergyInElectronVolts);
            double omega = Math.Sqrt(k * PhysicalConstants.ElementaryChargeCoulomb * 1e20 / m.InKilograms);
            double hbar = PhysicalConstants.ReducedPlanckJouleSecond;
            double expected = hbar / (2 * m.InKilograms * omega) / Math.Tanh(hbar * omega / (2 * PhysicalConstants.BoltzmannJoulePerKelvin * t)) * 1e20;
            Assert.Equal(expected, h.QuantumVarianceInAngstromsSquared, 15);
            Assert.Equal(hbar / (2 * m.InKilograms * omega) * 1e20, h.ZeroPointVarianceInAngstromsSquared, 15);
            Assert.Equal(hbar * omega / PhysicalConstants.ElementaryChargeCoulomb, h.QuantumEnergyInElectronVolts, 15);
            Assert.True(h.QuantumVarianceInAngstromsSquared >= h.ClassicalVarianceInAngstromsSquared);
            Assert.True(h.QuantumVarianceInAngstromsSquared >= h.ZeroPointVarianceInAngstromsSquared);
            if (h.QuantumToThermalRatio < 0.5)
            {
                // Wigner–Kirkwood is the first term of the high-temperature expansion: error O(x⁴).
                Assert.True(Math.Abs(h.WignerKirkwoodVarianceInAngstromsSquared - h.QuantumVarianceInAngstromsSquared) < Math.Pow(h.QuantumToThermalRatio, 4) / 500 * h.ClassicalVarianceInAngstromsSquared);
            }
        }
    }

    [Fact]
    public void Hydrogen_at_20_K_is_flagged_as_non_classical_a_xenon_mass_at_300_K_is_not_and_the_argon_wavelength_at_300_K_is_0_16_A()
    {
        // Source: Sources.LightAtoms and Sources.DeBroglie. Invented well: a Morse bond of 0.1 eV depth, a = 1.5/Å.
        var morse = new Morse(Energy.FromElectronVolts(0.1), 1.5, Length.FromAngstroms(3.0));
        var landscape = PairLandscape.Line(morse, Length.FromAngstroms(2.2), Length.FromAngstroms(4.5));
        var hydrogen = ClassicalValidity.AssessPair(landscape, Mass.FromAtomicMassUnits(1.008), K(20));
        Assert.Contains(hydrogen.Warnings, w => w.Code == WarningCodes.QuantumEffects);
        Assert.Contains(hydrogen.Warnings, w => w.Code == WarningCodes.DeBroglieWavelength);
        Assert.False(hydrogen.IsClassicalPictureTrustworthy);
        var xenonLike = ClassicalValidity.AssessPair(landscape, Mass.FromAtomicMassUnits(131.29), K(300));
        Assert.DoesNotContain(xenonLike.Warnings, w => w.Code is WarningCodes.QuantumEffects or WarningCodes.DeBroglieWavelength);
        // Λ = h/sqrt(2π m kB T) for argon at 300 K is about 0.16 Å (recalled from memory: order of magnitude only).
        Assert.InRange(ClassicalValidity.DeBroglieWavelengthInAngstroms(ArgonMass, K(300)), 0.15, 0.17);
    }

    [Theory]
    [InlineData(10, false)]
    [InlineData(40, true)]
    public void First_order_far_from_the_exact_shift_is_called_outside_its_range(double kelvin, bool invalid)
    {
        // Invented pair (ε = 0.015 eV at r_min = 3.5 Å, window 3–6 Å): at 10 K first order (0.029 Å) is within 20 % of the
        // exact shift (0.033 Å); at 40 K (0.117 Å against 0.262 Å) it is not.
        var pair = LennardJones.FromMinimum(Length.FromAngstroms(3.5), Energy.FromElectronVolts(0.015));
        var landscape = PairLandscape.Line(pair, Length.FromAngstroms(3.0), Length.FromAngstroms(6.0));
        var references = Reports.PairSummary.Analyse(landscape, Mass.FromAtomicMassUnits(50), K(kelvin));
        double exactShift = references.Exact.MeanInAngstroms - 3.5, firstOrder = references.FirstOrder!.MeanShiftInAngstroms;
        Assert.Equal(invalid, Math.Abs(firstOrder - exactShift) > 0.2 * exactShift);
        Assert.Equal(invalid, references.Warnings.Any(w => w.Code == WarningCodes.PerturbationInvalid));
    }

    [Fact]
    public void Shallow_well_at_high_temperature_warns_about_escape_and_wall_mass()
    {
        // Source: Sources.FiniteWell. Invented: an LJ well of 10 K depth at 30 K.
        var shallow = LennardJones.FromMinimum(Length.FromAngstroms(3.5), Energy.FromKelvin(10));
        var landscape = PairLandscape.Line(shallow, Length.FromAngstroms(3.0), Length.FromAngstroms(8.0));
        var v = ClassicalValidity.AssessPair(landscape, ArgonMass, K(30));
        Assert.Contains(v.Warnings, w => w.Code == WarningCodes.EscapeRisk);
        Assert.Contains(v.Warnings, w => w.Code == WarningCodes.WallMass);
        Assert.True(v.ProbabilityNearWalls > 0.01);
        Assert.InRange(v.ProbabilityNearWalls!.Value, 0, 1);
        Assert.Contains("walls", v.Warnings.Single(w => w.Code == WarningCodes.WallMass).Message);
    }

    [Fact]
    public void Walls_that_hold_nothing_raise_no_wall_warning_even_when_the_outer_band_has_probability()
    {
        // The inner 10% band [3.0, 3.3] Å of this window lies only 1.5 harmonic widths from r0, so it holds probability,
        // but the wall at 3.0 Å sits 32 kT up the repulsive wall: moving it changes nothing.
        var lj = LennardJones.FromMinimum(Length.FromAngstroms(3.5), Energy.FromElectronVolts(0.012));
        var landscape = PairLandscape.Line(lj, Length.FromAngstroms(3.0), Length.FromAngstroms(6.0));
        var exact = ExactPairDistribution.Compute(landscape, K(10));
        Assert.True(exact.CumulativeProbability(3.3) > 1e-3);
        Assert.True(exact.ProbabilityNearWalls < 1e-4);
        Assert.DoesNotContain(ClassicalValidity.AssessPair(landscape, ArgonMass, K(10)).Warnings, w => w.Code == WarningCodes.WallMass);
    }

    [Fact]
    public void Fcc_cage_harmonic_msd_is_three_kT_over_k_site_and_isotropic()
    {
        // k_site = 4 V''(r0) for 12 neighbours at r0 (derivable by hand; Sources.LennardJonesDerivatives).
        var cage = SiteLandscape.Create(Lj, LatticeSites.NeighbourCage(LatticeKind.FaceCentredCubic, Length.FromAngstroms(3.8)),
            Position.Origin, Confinement.Sphere(Length.FromAngstroms(1.5)));
        var t = K(40);
        var h = SiteAnalysis.Harmonic(cage, ArgonMass, t);
        double kSite = 4 * 72 * Energy.FromKelvin(119.8).InElectronVolts / (3.8 * 3.8);
        Assert.Equal(3 * t.ThermalEnergyInElectronVolts / kSite, h.ClassicalMeanSquareDisplacement, 12);
        Assert.Equal(h.ClassicalCovariance.XX, h.ClassicalCovariance.ZZ, 14);
        Assert.Equal(0.0, h.ClassicalCovariance.XY, 14);
        Assert.All(h.Modes, m => Assert.Equal(kSite, m.StiffnessElectronVoltsPerAngstromSquared, 10));
        Assert.Equal(0.0, h.FirstOrderMeanShift.Norm, 10); // inversion symmetry
        // Source: Sources.DebyeWaller, B = 8π² U_iso.
        Assert.Equal(8 * Math.PI * Math.PI * h.ClassicalMeanSquareDisplacement / 3, h.ClassicalDebyeWallerB, 12);
        Assert.True(h.QuantumMeanSquareDisplacement > h.ClassicalMeanSquareDisplacement);
    }

    [Fact]
    public void Surface_site_first_order_shift_points_away_from_the_surface()
    {
        // Anharmonic softening on the vacuum side pushes the mean outwards (+z); by symmetry no lateral shift.
        var g = LatticeSites.Surface(LatticeKind.FaceCentredCubic, new MillerIndices(1, 1, 1), AdsorptionSiteKind.FccHollow, Length.FromAngstroms(3.8));
        var site = SiteLandscape.Create(Lj, g.Sites, g.Start, Confinement.Sphere(Length.FromAngstroms(1.5)));
        var h = SiteAnalysis.Harmonic(site, ArgonMass, K(20));
        Assert.True(h.FirstOrderMeanShift.Z > 0);
        Assert.True(Math.Abs(h.FirstOrderMeanShift.X) < 1e-6 * h.FirstOrderMeanShift.Z);
        Assert.True(Math.Abs(h.FirstOrderMeanShift.Y) < 1e-6 * h.FirstOrderMeanShift.Z);
        Assert.True(h.ClassicalCovariance.ZZ != h.ClassicalCovariance.XX, "a surface site is anisotropic");
    }

    [Fact]
    public void Analysis_refuses_a_minimum_outside_the_window()
    {
        var landscape = PairLandscape.Line(Lj, Length.FromAngstroms(4.5), Length.FromAngstroms(8.0));
        Assert.Contains("outside the window", Assert.Throws<LandscapeException>(() => PairAnalysis.FirstOrder(landscape, K(10))).Message);
        // The exact distribution still exists (the walls hold it).
        Assert.True(ExactPairDistribution.Compute(landscape, K(10)).ProbabilityNearLowerWall > 0.5);
    }

    [Fact]
    public void Potential_delegate_returning_NaN_inside_the_window_is_reported()
    {
        var bad = new FunctionPotential(r => r > 3.9 && r < 3.95 ? double.NaN : Lj.Energy(r), Length.FromAngstroms(3), Length.FromAngstroms(6),
            derivatives: Lj.Derivatives, description: "broken fit");
        var landscape = PairLandscape.Line(bad, Length.FromAngstroms(3.2), Length.FromAngstroms(5.0));
        var ex = Assert.Throws<NonFiniteEnergyException>(() => ExactPairDistribution.Compute(landscape, K(30)));
        Assert.Contains("broken fit", ex.Message);
        Assert.InRange(ex.Separation, 3.9, 3.95);
    }
}
