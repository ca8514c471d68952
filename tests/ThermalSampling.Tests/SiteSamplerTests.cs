using System;
using System.Linq;
using ThermalSampling.Reports;
using ThermalSampling.Statistics;
using ThermalSampling.Analysis;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Sampling;
using ThermalSampling.Units;
using Xunit;

namespace ThermalSampling.Tests;

public class SiteSamplerTests
{
    private static readonly Mass ArgonMass = Mass.FromAtomicMassUnits(39.948);
    private static readonly LennardJones Lj = LennardJones.FromMinimum(Length.FromAngstroms(3.8), Energy.FromKelvin(119.8)); // Sources.Argon (eps)

    private static SiteLandscape<LennardJones> FccCage() => SiteLandscape.Create(Lj,
        LatticeSites.NeighbourCage(LatticeKind.FaceCentredCubic, Length.FromAngstroms(3.8)), Position.Origin, Confinement.Sphere(Length.FromAngstroms(1.2)));

    private static SamplingSettings Settings(SamplingMethod method, ulong seed = 11, long samples = 60_000) => new()
    {
        Seed = seed, Method = method, Chains = 4, SamplesPerChain = samples, BurnIn = 5_000,
    };

    [Fact]
    public void Fcc_cage_msd_approaches_the_harmonic_three_kT_over_k_site_at_low_temperature()
    {
        // k_site = 4 V''(r0) = 288 u0/r0² (derivable by hand; Sources.LennardJonesDerivatives). Anharmonic corrections are O(T) relative.
        var report = SiteSampler.Run(FccCage(), ArgonMass, Temperature.FromKelvin(2), Settings(SamplingMethod.Metropolis));
        double kSite = 288 * Energy.FromKelvin(119.8).InElectronVolts / (3.8 * 3.8);
        double harmonic = 3 * Temperature.FromKelvin(2).ThermalEnergyInElectronVolts / kSite;
        Assert.Equal(harmonic, report.Harmonic.ClassicalMeanSquareDisplacement, 12);
        double ratio = report.MeanSquareDisplacement.Value / harmonic;
        Assert.True(Math.Abs(ratio - 1) < 0.03 + 4 * report.MeanSquareDisplacement.StandardError / harmonic, $"MSD/harmonic = {ratio}");
        Assert.True(report.Diagnostics.RHat < 1.01);
    }

    [Fact]
    public void Fcc_cage_covariance_is_isotropic_and_centred_within_error()
    {
        var report = SiteSampler.Run(FccCage(), ArgonMass, Temperature.FromKelvin(30), Settings(SamplingMethod.Metropolis, samples: 100_000));
        double third = report.MeanSquareDisplacement.Value / 3;
        // Each diagonal element is an MSD/3-sized quantity; its error is at most about the MSD error (conservative).
        double tolerance = 4 * report.MeanSquareDisplacement.StandardError;
        Assert.True(Math.Abs(report.Covariance.XX - third) < tolerance, $"{report.Covariance}");
        Assert.True(Math.Abs(report.Covariance.YY - third) < tolerance, $"{report.Covariance}");
        Assert.True(Math.Abs(report.Covariance.ZZ - third) < tolerance, $"{report.Covariance}");
        Assert.True(Math.Abs(report.Covariance.XY) < tolerance && Math.Abs(report.Covariance.XZ) < tolerance && Math.Abs(report.Covariance.YZ) < tolerance);
        Assert.True(Math.Abs(report.Mean.X) < 4 * report.MeanStandardError.X);
        Assert.True(Math.Abs(report.Mean.Z) < 4 * report.MeanStandardError.Z);
        Assert.Equal(8 * Math.PI * Math.PI * report.MeanSquareDisplacement.Value / 3, report.DebyeWallerB!.Value, 12); // Sources.DebyeWaller
        Assert.InRange(report.Diagnostics.AcceptanceRate!.Value, 0.2, 0.45);
    }

    [Fact]
    public void Metropolis_and_direct_sampling_agree_on_the_fcc_cage()
    {
        var metropolis = SiteSampler.Run(FccCage(), ArgonMass, Temperature.FromKelvin(20), Settings(SamplingMethod.Metropolis));
        var direct = SiteSampler.Run(FccCage(), ArgonMass, Temperature.FromKelvin(20), Settings(SamplingMethod.Direct));
        double se = Math.Sqrt(Math.Pow(metropolis.MeanSquareDisplacement.StandardError, 2) + Math.Pow(direct.MeanSquareDisplacement.StandardError, 2));
        Assert.True(Math.Abs(metropolis.MeanSquareDisplacement.Value - direct.MeanSquareDisplacement.Value) < 4 * se,
            $"{metropolis.MeanSquareDisplacement} vs {direct.MeanSquareDisplacement}");
        Assert.InRange(direct.Diagnostics.AutocorrelationTime, 0.85, 1.2); // independent draws
    }

    [Fact]
    public void Surface_hollow_mean_shift_follows_the_first_order_prediction_at_low_temperature()
    {
        var g = LatticeSites.Surface(LatticeKind.FaceCentredCubic, new MillerIndices(1, 1, 1), AdsorptionSiteKind.FccHollow, Length.FromAngstroms(3.8));
        var site = SiteLandscape.Create(Lj, g.Sites, g.Start, Confinement.Sphere(Length.FromAngstroms(1.5)));
        var report = SiteSampler.Run(site, ArgonMass, Temperature.FromKelvin(4), Settings(SamplingMethod.Metropolis, samples: 100_000));
        double predicted = report.Harmonic.FirstOrderMeanShift.Z;
        double se = report.MeanStandardError.Z;
        // First order is exact up to O(T²): allow 15% of the shift for the next order, plus 4 standard errors.
        Assert.True(Math.Abs(report.MeanShift.Z - predicted) < 0.15 * Math.Abs(predicted) + 4 * se, $"{report.MeanShift.Z} ± {se} vs {predicted}");
        Assert.True(report.Covariance.ZZ < report.Covariance.XX, "stiffer normal to the surface than along it");
    }

    [Fact]
    public void Site_results_do_not_depend_on_thread_count()
    {
        SamplingSettings S(int threads) => Settings(SamplingMethod.Metropolis, samples: 10_000) with { Chains = 6, MaxThreads = threads };
        var one = SiteSampler.Run(FccCage(), ArgonMass, Temperature.FromKelvin(30), S(1));
        var two = SiteSampler.Run(FccCage(), ArgonMass, Temperature.FromKelvin(30), S(2));
        Assert.Equal(one.Covariance, two.Covariance);
        Assert.Equal(one.Mean, two.Mean);
        Assert.Equal(one.Diagnostics, two.Diagnostics);
    }

    [Fact]
    public void Direct_sampling_refuses_a_loosely_held_adatom_and_says_to_use_Metropolis()
    {
        // A hollow site at 300 K (kT about twice the pair well depth) in a 3 Å sphere: far from harmonic towards the vacuum,
        // so no useful Gaussian envelope exists.
        var g = LatticeSites.Surface(LatticeKind.FaceCentredCubic, new MillerIndices(1, 1, 1), AdsorptionSiteKind.FccHollow, Length.FromAngstroms(3.8));
        var site = SiteLandscape.Create(Lj, g.Sites, g.Start, Confinement.Sphere(Length.FromAngstroms(3.0)));
        var ex = Assert.Throws<InvalidOperationException>(() => SiteSampler.Run(site, ArgonMass, Temperature.FromKelvin(300), Settings(SamplingMethod.Direct, samples: 1000)));
        Assert.Contains("Use Metropolis", ex.Message);
    }

    [Fact]
    public void A_top_site_is_not_a_minimum_and_is_refused_with_the_reason()
    {
        // For pair potentials an adatom above a surface atom sits on a saddle: it slides towards the hollows.
        var g = LatticeSites.Surface(LatticeKind.FaceCentredCubic, new MillerIndices(1, 0, 0), AdsorptionSiteKind.Top, Length.FromAngstroms(3.8));
        var site = SiteLandscape.Create(Lj, g.Sites, g.Start, Confinement.Sphere(Length.FromAngstroms(0.5)));
        var ex = Assert.Throws<LandscapeException>(() => SiteSampler.Run(site, ArgonMass, Temperature.FromKelvin(30), Settings(SamplingMethod.Metropolis, samples: 1000)));
        Assert.Contains("not a stable minimum", ex.Message);
    }

    [Fact]
    public void Retained_positions_come_back_per_chain()
    {
        var report = SiteSampler.Run(FccCage(), ArgonMass, Temperature.FromKelvin(30), Settings(SamplingMethod.Metropolis, samples: 2000) with { RetainedDrawsPerChain = 500 });
        Assert.Equal(4, report.Draws.Chains.Length);
        Assert.All(report.Draws.Chains, c => Assert.Equal(500, c.Length));
        Assert.Equal(report.MeanSquareDisplacement.Value / 3, report.IsotropicDisplacement!.Value, 15);
    }

    [Fact]
    public void Covariance_accumulators_merge_exactly()
    {
        var random = Randomness.RandomStream.FromSeed(3);
        var whole = new CovarianceAccumulator();
        var a = new CovarianceAccumulator();
        var b = new CovarianceAccumulator();
        for (int i = 0; i < 1000; i++)
        {
            double x = random.NextStandardNormal(), y = x + random.NextStandardNormal(), z = 3 + 0.1 * random.NextStandardNormal();
            whole.Add(x, y, z);
            if (i < 377)
            {
                a.Add(x, y, z);
            }
            else
            {
                b.Add(x, y, z);
            }
        }
        var merged = CovarianceAccumulator.Merge(a, b).Covariance();
        var single = whole.Covariance();
        Assert.Equal(single.XX, merged.XX, 12);
        Assert.Equal(single.XY, merged.XY, 12);
        Assert.Equal(single.ZZ, merged.ZZ, 12);
        Assert.Equal(single.YZ, merged.YZ, 12);
    }

    [Theory]
    [InlineData(SamplingMethod.Metropolis)]
    [InlineData(SamplingMethod.Direct)]
    public void The_mean_potential_energy_at_a_site_approaches_three_halves_kT_at_low_temperature(SamplingMethod method)
    {
        // Equipartition in 3D (common practice, no source): ⟨V⟩ − V_min → 3kT/2 and Var(V) → 3(kT)²/2 as the site becomes
        // harmonic; anharmonicity is O(kT) relative, about 1 % here (the fcc cage at 2 K).
        var t = Temperature.FromKelvin(2);
        double kT = t.ThermalEnergyInElectronVolts;
        var report = SiteSampler.Run(FccCage(), ArgonMass, t, Settings(method));
        Assert.True(Math.Abs(report.PotentialEnergy.Value - 1.5 * kT) < 0.03 * 1.5 * kT + 4 * report.PotentialEnergy.StandardError,
            $"⟨V⟩ − V_min = {report.PotentialEnergy.ToRoundedString()} eV against 3kT/2 = {1.5 * kT:G5} eV");
        Assert.InRange(report.PotentialEnergyVarianceInElectronVoltsSquared / (kT * kT), 1.35, 1.65);
    }
}
