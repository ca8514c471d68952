using System;
using System.Linq;
using System.Runtime.Intrinsics;
using ThermalSampling.Analysis;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Reports;
using ThermalSampling.Sampling;
using ThermalSampling.Statistics;
using ThermalSampling.Units;
using Xunit;
using Xunit.Abstractions;

namespace ThermalSampling.Tests;

/// <summary>Path-integral Monte Carlo: the ring-polymer walk on the lane engine, against closed forms and the exact grid.</summary>
public class PathIntegralTests(ITestOutputHelper output)
{
    private static readonly double Hbar2OverU = PhysicalConstants.HbarSquaredOverAtomicMassElectronVoltAngstromSquared;

    /// <summary>
    /// The primitive discretisation's exact bead variance for a harmonic well, from the ring's normal modes (derived in
    /// docs/quantum.md): ⟨x²⟩_P = Σ_{k=0}^{P−1} 1/[βmω² + (4mP²/(βħ²)) sin²(πk/P)].
    /// </summary>
    internal static double FiniteBeadVariance(double stiffness, double massU, double beta, int beads)
    {
        double sum = 0, mOverHbar2 = massU / Hbar2OverU;
        for (int k = 0; k < beads; k++)
        {
            double s = Math.Sin(Math.PI * k / beads);
            sum += 1 / (beta * stiffness + 4 * mOverHbar2 * beads * beads / beta * s * s);
        }
        return sum;
    }

    [Theory]
    [InlineData(1, RingMoves.Staging)]
    [InlineData(2, RingMoves.Staging)]
    [InlineData(4, RingMoves.Staging)]
    [InlineData(8, RingMoves.Staging)]
    [InlineData(32, RingMoves.Staging)]
    [InlineData(8, RingMoves.SingleBead)]
    [InlineData(32, RingMoves.SingleBead)]
    internal void Raw_ring_walk_matches_the_finite_bead_variance(int beads, RingMoves moves)
    {
        const double k = 2.0, massU = 4, kelvin = 20;
        var bond = new HarmonicBond(k, Length.FromAngstroms(3));
        var landscape = PairLandscape.Line(bond, Length.FromAngstroms(1.0), Length.FromAngstroms(5.0));
        var t = Temperature.FromKelvin(kelvin);
        double beta = 1 / t.ThermalEnergyInElectronVolts;
        var references = PairSummary.Analyse(landscape, Mass.FromAtomicMassUnits(massU), t);
        var settings = new SamplingSettings { Seed = 7, Chains = 8, SamplesPerChain = 200_000, BurnIn = 20_000 };
        var ring = new RingPlan(beads, Math.Min(beads, 8), Hbar2OverU / massU, moves);
        var record = PairChains.Sample(landscape, references.Exact, 3.0, 0.1, 0.44, t, settings, null, default, null, 0, ChainRange.All(8), ring);
        var m = record.Chains.Select(c => c.Separation).Aggregate((a, b) => MomentAccumulator.Merge(a, b));
        double expected = FiniteBeadVariance(k, massU, beta, beads);
        output.WriteLine($"P={beads}: sampled {m.Variance:G6} expected {expected:G6} ratio {m.Variance / expected:F4} accept {record.Chains.Average(c => (double)c.Accepted / c.Proposals):F3}");
        Assert.InRange(m.Variance / expected, moves == RingMoves.Staging ? 0.97 : 0.9, moves == RingMoves.Staging ? 1.03 : 1.1); // the baseline mixes slowly
    }

    /// <summary>
    /// The front door on the invented harmonic line (k = 2 eV/Å², 4 u, ħω/kT = 26.5 at 20 K): the runs at P and P/2 each
    /// match their finite-P closed form within 4 standard errors, and the extrapolated variance matches the quantum oscillator's
    /// (ħ/2mω) coth(βħω/2) (closed form) within 4 standard errors and 1 %; the default P follows the documented rule.
    /// </summary>
    [Fact]
    public void Extrapolated_harmonic_variance_matches_the_quantum_oscillator()
    {
        const double k = 2.0, massU = 4;
        var landscape = PairLandscape.Line(new HarmonicBond(k, Length.FromAngstroms(3)), Length.FromAngstroms(1.0), Length.FromAngstroms(5.0));
        var t = Temperature.FromKelvin(20);
        double beta = 1 / t.ThermalEnergyInElectronVolts, hw = Math.Sqrt(Hbar2OverU * k / massU);
        var settings = new SamplingSettings { Seed = 11, Chains = 8, SamplesPerChain = 100_000, BurnIn = 10_000 };
        var report = PathIntegralSampler.RunPair(landscape, Mass.FromAtomicMassUnits(massU), t, settings);
        Assert.Equal(PathIntegralSampler.DefaultBeads(beta * hw), report.PathIntegral.Beads);
        Assert.Equal(64, report.PathIntegral.Beads); // 2·26.5 = 53 → 64
        foreach (var (run, p) in new[] { (report.AtBeads, report.PathIntegral.Beads), (report.AtHalfBeads, report.PathIntegral.Beads / 2) })
        {
            double closed = FiniteBeadVariance(k, massU, beta, p);
            Assert.True(Math.Abs(run.Variance.ZScore(closed)) < 4, $"P = {p}: {run.Variance} against {closed:G6}");
        }
        double exact = Hbar2OverU / massU / (2 * hw) / Math.Tanh(beta * hw / 2);
        output.WriteLine($"extrapolated {report.Variance} exact {exact:G6} P-run {report.AtBeads.Variance} correction {report.PathIntegral.RelativeBeadCorrection:P2}");
        Assert.True(Math.Abs(report.Variance.ZScore(exact)) < 4, $"{report.Variance} against {exact:G6}");
        Assert.InRange(report.Variance.Value / exact, 0.99, 1.01);
        Assert.True(report.PathIntegral.Converged);
        Assert.Equal(Hbar2OverU / massU / (2 * hw), report.PathIntegral.ZeroPointVarianceInAngstromsSquared, 1e-9);
        Assert.Contains(report.Warnings, w => w.Code.Contains("quantum", StringComparison.Ordinal)); // 10× the classical spread
        // The centroid-virial kinetic energy against the oscillator's (ħω/4) coth(βħω/2) (closed form), far above kT/2.
        double kinetic = hw / 4 / Math.Tanh(beta * hw / 2);
        output.WriteLine($"kinetic {report.KineticEnergy} exact {kinetic:G6} classical {report.ClassicalKineticEnergyInElectronVolts:G4}");
        Assert.True(Math.Abs(report.KineticEnergy.ZScore(kinetic)) < 4, $"{report.KineticEnergy} against {kinetic:G6}");
        Assert.InRange(report.KineticEnergy.Value / kinetic, 0.98, 1.02);
        Assert.True(report.KineticEnergy.Value > 10 * report.ClassicalKineticEnergyInElectronVolts);
    }

    /// <summary>
    /// An invented Morse well on a line (0.3 eV, 1.8/Å, 2.0 Å, 2 u): path-integral mean and variance agree with the grid's
    /// exact quantum thermal averages (Colbert–Miller, checked against the analytic Morse levels in QuantumGridTests) within
    /// 4 standard errors at 30, 150 and 600 K (ħω/kT = 12.5, 2.5 and 0.6).
    /// </summary>
    [Theory]
    [InlineData(30)]
    [InlineData(150)]
    [InlineData(600)]
    public void Morse_line_agrees_with_the_exact_grid(double kelvin)
    {
        var morse = new Morse(Energy.FromElectronVolts(0.3), 1.8, Length.FromAngstroms(2.0));
        var landscape = PairLandscape.Line(morse, Length.FromAngstroms(1.2), Length.FromAngstroms(4.5));
        var settings = new SamplingSettings { Seed = 5, Chains = 8, SamplesPerChain = 40_000, BurnIn = 5_000 };
        var report = PathIntegralSampler.RunPair(landscape, Mass.FromAtomicMassUnits(2), Temperature.FromKelvin(kelvin), settings);
        output.WriteLine($"{kelvin} K P={report.PathIntegral.Beads} L={report.PathIntegral.StagingLinks} ħω/kT={report.PathIntegral.LargestQuantumToThermalRatio:G3}: mean {report.Mean} exact {report.Exact.MeanInAngstroms:G6}; var {report.Variance} exact {report.Exact.VarianceInAngstromsSquared:G6}; accept {report.AtBeads.Diagnostics.AcceptanceRate:F3}");
        Assert.True(Math.Abs(report.ZScoresAgainstExact.Mean) < 4, $"mean z = {report.ZScoresAgainstExact.Mean:G3}");
        Assert.True(Math.Abs(report.ZScoresAgainstExact.Variance) < 4, $"variance z = {report.ZScoresAgainstExact.Variance:G3}");
        Assert.DoesNotContain(report.Warnings, w => w.Code == WarningCodes.DisagreesWithExact);
    }

    /// <summary>
    /// The invented fcc cage (12 Lennard-Jones neighbours, 10 meV at 3.5 Å) with 20 u at 5 K: the path-integral
    /// mean-square displacement agrees with the exact quantum basis value (QuantumSite) within 4 standard errors, is many
    /// times the classical one, and the report says so in a warning whose code contains "quantum".
    /// </summary>
    [Fact]
    public void Fcc_cage_agrees_with_the_basis_result()
    {
        var settings = new SamplingSettings { Seed = 3, Chains = 4, SamplesPerChain = 20_000, BurnIn = 4_000 };
        var report = PathIntegralSampler.RunSite(InventedLandscapes.Cage, Mass.FromAtomicMassUnits(20), Temperature.FromKelvin(5), settings);
        Assert.NotNull(report.Exact);
        double exact = report.Exact!.MeanSquareDisplacementInAngstromsSquared;
        output.WriteLine($"P={report.PathIntegral.Beads} L={report.PathIntegral.StagingLinks}: MSD {report.MeanSquareDisplacement} exact {exact:G6} classical {report.Classical.MeanSquareDisplacement}");
        Assert.True(Math.Abs(report.MeanSquareDisplacement.ZScore(exact)) < 4, $"{report.MeanSquareDisplacement} against {exact:G6}");
        Assert.True(report.MeanSquareDisplacement.Value > 3 * report.Classical.MeanSquareDisplacement.Value);
        Assert.Contains(report.Warnings, w => w.Code.Contains("quantum", StringComparison.Ordinal) && w.Message.Contains("underestimate", StringComparison.Ordinal));
        Assert.True(report.Mean.Norm < 5 * report.MeanStandardError.Norm + 1e-3);
        Assert.Equal(8 * Math.PI * Math.PI / 3 * report.MeanSquareDisplacement.Value, report.DebyeWallerB.Value, 1e-12);
    }

    /// <summary>
    /// An anisotropic near-harmonic site (invented: springs ½k(r − r0)², k = 1 eV/Å², r0 = 1 Å, to neighbours at ±1.5, ±2.0
    /// and ±3.0 Å along x, y and z; 6 u; 40 K): each diagonal component of the path-integral covariance agrees with the
    /// exact quantum basis within 4 standard errors of the mean-square displacement, and the three differ (the site is anisotropic).
    /// </summary>
    [Fact]
    public void Anisotropic_site_agrees_with_the_basis_component_by_component()
    {
        Position[] sites = [new(1.5, 0, 0), new(-1.5, 0, 0), new(0, 2, 0), new(0, -2, 0), new(0, 0, 3), new(0, 0, -3)];
        var site = SiteLandscape.Create(new HarmonicBond(1.0, Length.FromAngstroms(1.0)), sites, Position.Origin, Confinement.Sphere(Length.FromAngstroms(0.8)));
        var settings = new SamplingSettings { Seed = 9, Chains = 4, SamplesPerChain = 20_000, BurnIn = 4_000 };
        var report = PathIntegralSampler.RunSite(site, Mass.FromAtomicMassUnits(6), Temperature.FromKelvin(40), settings);
        Assert.NotNull(report.Exact);
        var q = report.Exact!.Covariance;
        var c = report.Covariance;
        double se = report.MeanSquareDisplacement.StandardError;
        output.WriteLine($"PIMC {c} basis {q} MSD {report.MeanSquareDisplacement}");
        Assert.True(Math.Abs(c.XX - q.XX) < 4 * se && Math.Abs(c.YY - q.YY) < 4 * se && Math.Abs(c.ZZ - q.ZZ) < 4 * se);
        Assert.True(q.XX < q.YY && q.YY < q.ZZ);
        // Both against the product of 1D closed forms along the normal modes, Σ (ħ/2mω) coth(ħω/2kT) v vᵀ (the quantum harmonic
        // covariance): the site is near-harmonic at this amplitude (⟨u²⟩/a² ≈ 0.003), so they agree to 2 %.
        var closed = Analysis.SiteAnalysis.Harmonic(site, Mass.FromAtomicMassUnits(6), Temperature.FromKelvin(40)).QuantumCovariance;
        output.WriteLine($"closed forms {closed}");
        foreach (var (sampled, basis, harmonic) in new[] { (c.XX, q.XX, closed.XX), (c.YY, q.YY, closed.YY), (c.ZZ, q.ZZ, closed.ZZ) })
        {
            Assert.InRange(basis / harmonic, 0.98, 1.02);
            Assert.True(Math.Abs(sampled - harmonic) < 4 * se + 0.02 * harmonic);
        }
        // The centroid-virial kinetic energy against Σ_modes (ħω/4) coth(ħω/2kT), and the zero-point spread against
        // Σ_modes ħ/(2mω), from CODATA 2018 constants written out here (ħ = 6.582119569e-16 eV s, u = 1.66053906660e-27 kg,
        // e = 1.602176634e-19 C) and the modes' angular frequencies.
        const double hbarEvS = 6.582119569e-16, atomicMassKg = 1.66053906660e-27, electronVolt = 1.602176634e-19;
        double kt = 8.617333262e-5 * 40, kinetic = 0, zeroPoint = 0;
        foreach (var mode in Analysis.SiteAnalysis.Harmonic(site, Mass.FromAtomicMassUnits(6), Temperature.FromKelvin(40)).Modes)
        {
            double hw = hbarEvS * mode.AngularFrequencyPerSecond;
            kinetic += hw / 4 / Math.Tanh(hw / (2 * kt));
            zeroPoint += hbarEvS * electronVolt / (2 * 6 * atomicMassKg * mode.AngularFrequencyPerSecond) * 1e20; // m² to Å²
        }
        output.WriteLine($"kinetic {report.KineticEnergy} closed form {kinetic:G6}; zero-point {report.PathIntegral.ZeroPointVarianceInAngstromsSquared:G6} closed form {zeroPoint:G6}");
        Assert.True(Math.Abs(report.KineticEnergy.Value - kinetic) < 4 * report.KineticEnergy.StandardError + 0.02 * kinetic, $"{report.KineticEnergy} against {kinetic:G6}");
        Assert.Equal(1.0, report.PathIntegral.ZeroPointVarianceInAngstromsSquared / zeroPoint, 9);
    }

    /// <summary>
    /// Too few beads for a strongly quantum well (the invented harmonic line, ħω/kT = 26.5, with P = 4): the extrapolation
    /// moves the value by far more than the tolerance, and the report says so (not converged, with a warning).
    /// </summary>
    [Fact]
    public void Too_few_beads_are_reported_as_not_converged()
    {
        var landscape = PairLandscape.Line(new HarmonicBond(2.0, Length.FromAngstroms(3)), Length.FromAngstroms(1.0), Length.FromAngstroms(5.0));
        var settings = new SamplingSettings { Seed = 2, Chains = 4, SamplesPerChain = 20_000, BurnIn = 2_000 };
        var report = PathIntegralSampler.RunPair(landscape, Mass.FromAtomicMassUnits(4), Temperature.FromKelvin(20), settings, beads: 4);
        Assert.False(report.PathIntegral.Converged);
        Assert.True(report.PathIntegral.RelativeBeadCorrection > 0.1); // 0.139 from the closed form at P = 2 and 4
        Assert.Contains(report.Warnings, w => w.Code == WarningCodes.QuantumBeadsNotConverged && w.Message.Contains("from 2 and 4 beads", StringComparison.Ordinal));
        Assert.Throws<ArgumentOutOfRangeException>(() => PathIntegralSampler.RunPair(landscape, Mass.FromAtomicMassUnits(4), Temperature.FromKelvin(20), settings, beads: 6));
    }

    /// <summary>The path-integral runs are the same bits at every lane width and thread count (line, radial and site rings).</summary>
    [Theory]
    [InlineData("line")]
    [InlineData("radial")]
    [InlineData("site")]
    public void Ring_walks_give_the_same_bits_at_every_lane_width_and_thread_count(string which)
    {
        var morse = new Morse(Energy.FromElectronVolts(0.3), 1.8, Length.FromAngstroms(2.0));
        double[] Run(int? lanes, int threads)
        {
            var settings = new SamplingSettings { Seed = 21, Chains = 5, SamplesPerChain = 3000, BurnIn = 500, ChainsPerVector = lanes, MaxThreads = threads };
            var mass = Mass.FromAtomicMassUnits(which == "site" ? 20 : 2);
            var t = Temperature.FromKelvin(which == "site" ? 10 : 60);
            if (which == "site")
            {
                var r = PathIntegralSampler.RunSite(InventedLandscapes.Cage, mass, t, settings, beads: 8);
                return [r.AtBeads.MeanSquareDisplacement.Value, r.AtBeads.Mean.X, r.AtHalfBeads.Covariance.XY, r.AtBeads.Diagnostics.AcceptanceRate ?? 0, .. r.AtBeads.Distribution.Radial.Density];
            }
            var landscape = which == "line"
                ? PairLandscape.Line(morse, Length.FromAngstroms(1.2), Length.FromAngstroms(4.5))
                : PairLandscape.Radial(morse, Length.FromAngstroms(1.2), Length.FromAngstroms(4.5));
            var p = PathIntegralSampler.RunPair(landscape, mass, t, settings, beads: 16);
            return [p.AtBeads.Mean.Value, p.AtBeads.Variance.Value, p.AtHalfBeads.Variance.Value, p.AtBeads.Diagnostics.AcceptanceRate ?? 0, .. p.AtBeads.Histogram.Density];
        }
        var reference = Run(1, 1);
        foreach (var (lanes, threads) in new (int?, int)[] { (2, 1), (4, 2), (8, 1), (null, 2) })
        {
            Assert.Equal(reference, Run(lanes, threads));
        }
    }

    /// <summary>
    /// A radial pair is sampled as its relative vector in three dimensions: the invented Morse pair of 2 u at 60 K agrees
    /// with the exact quantum grid (the l sum; QuantumGridTests checks it against the 3D oscillator) within 4 standard errors.
    /// </summary>
    [Fact]
    public void Radial_pair_agrees_with_the_l_sum()
    {
        var morse = new Morse(Energy.FromElectronVolts(0.3), 1.8, Length.FromAngstroms(2.0));
        var landscape = PairLandscape.Radial(morse, Length.FromAngstroms(1.2), Length.FromAngstroms(4.5));
        var settings = new SamplingSettings { Seed = 10, Chains = 8, SamplesPerChain = 40_000, BurnIn = 4_000 };
        var report = PathIntegralSampler.RunPair(landscape, Mass.FromAtomicMassUnits(2), Temperature.FromKelvin(60), settings);
        output.WriteLine($"P={report.PathIntegral.Beads}: mean {report.Mean} exact {report.Exact.MeanInAngstroms:G6}; var {report.Variance} exact {report.Exact.VarianceInAngstromsSquared:G6}");
        Assert.True(Math.Abs(report.ZScoresAgainstExact.Mean) < 4, $"mean z = {report.ZScoresAgainstExact.Mean:G3}");
        Assert.True(Math.Abs(report.ZScoresAgainstExact.Variance) < 4, $"variance z = {report.ZScoresAgainstExact.Variance:G3}");
    }

    /// <summary>
    /// Quantum → classical as T grows: the invented harmonic line (k = 2 eV/Å², 40 u) at 1200 K has ħω/kT = 0.14, and the
    /// path-integral variance equals the classical kT/k within 4 standard errors (the quantum excess (x/2)coth(x/2) − 1 is
    /// 0.16 % there), with no quantum warning.
    /// </summary>
    [Fact]
    public void Quantum_tends_to_classical_when_hot()
    {
        var landscape = PairLandscape.Line(new HarmonicBond(2.0, Length.FromAngstroms(3)), Length.FromAngstroms(1.0), Length.FromAngstroms(5.0));
        var settings = new SamplingSettings { Seed = 4, Chains = 8, SamplesPerChain = 30_000, BurnIn = 4_000 };
        var t = Temperature.FromKelvin(1200);
        var report = PathIntegralSampler.RunPair(landscape, Mass.FromAtomicMassUnits(40), t, settings);
        double classical = t.ThermalEnergyInElectronVolts / 2.0;
        output.WriteLine($"P={report.PathIntegral.Beads} ħω/kT={report.PathIntegral.LargestQuantumToThermalRatio:G3}: {report.Variance} classical {classical:G6}");
        Assert.True(report.PathIntegral.LargestQuantumToThermalRatio < 0.2);
        Assert.True(Math.Abs(report.Variance.ZScore(classical)) < 4, $"{report.Variance} against {classical:G6}");
        Assert.DoesNotContain(report.Warnings, w => w.Code == WarningCodes.QuantumEffects);
    }

    /// <summary>Reference: Math.Log (the platform's libm) over (0, 1] as the Gaussian draws use it, and over wide magnitudes; the same bits at every width.</summary>
    [Fact]
    public void Lane_logarithm_is_within_1e15_of_Math_Log_and_the_same_at_every_width()
    {
        var random = Randomness.RandomStream.FromSeed(31);
        double worst = 0;
        for (int i = 0; i < 200_000; i++)
        {
            double x = i % 2 == 0 ? 1 - random.NextUnitInterval() : Math.Exp(-700 + 1400 * random.NextUnitInterval());
            double mine = Numerics.LaneMath.Log<Numerics.Lanes1, double, ulong>(x);
            double reference = Math.Log(x);
            worst = Math.Max(worst, Math.Abs(mine - reference) / Math.Max(1, Math.Abs(reference)));
            var v8 = Numerics.LaneMath.Log<Numerics.Lanes8, System.Runtime.Intrinsics.Vector512<double>, System.Runtime.Intrinsics.Vector512<ulong>>(System.Runtime.Intrinsics.Vector512.Create(x));
            var v2 = Numerics.LaneMath.Log<Numerics.Lanes2, System.Runtime.Intrinsics.Vector128<double>, System.Runtime.Intrinsics.Vector128<ulong>>(System.Runtime.Intrinsics.Vector128.Create(x));
            Assert.Equal(mine, v8.GetElement(3));
            Assert.Equal(mine, v2.GetElement(1));
        }
        Assert.True(worst <= 1e-15, $"worst error {worst:G3}");
        Assert.Equal(0.0, Numerics.LaneMath.Log<Numerics.Lanes1, double, ulong>(1.0));
    }

    /// <summary>
    /// Light against heavy with the path integral (the invented Lennard-Jones well of QuantumGridTests, 20 meV at 3.5 Å, on
    /// [3.0, 5.0] Å, 20 K; 4 u and 130 u): the light atom's quantum variance is more than twice the classical one and the
    /// report warns that the spread is underestimated by more than 40 %; the heavy atom's correction (ħω/kT = 1.1, about
    /// 10 % in the harmonic estimate) is at most 20 % and under a tenth of the light one's, and its verdict says so.
    /// </summary>
    [Fact]
    public void Light_and_heavy_atoms_get_different_path_integral_verdicts()
    {
        var lj = LennardJones.FromMinimum(Length.FromAngstroms(3.5), Energy.FromElectronVolts(0.020));
        var line = PairLandscape.Line(lj, Length.FromAngstroms(3.0), Length.FromAngstroms(5.0));
        var t = Temperature.FromKelvin(20);
        var settings = new SamplingSettings { Seed = 12, Chains = 4, SamplesPerChain = 20_000, BurnIn = 2_000 };
        var light = PathIntegralSampler.RunPair(line, Mass.FromAtomicMassUnits(4), t, settings);
        var heavy = PathIntegralSampler.RunPair(line, Mass.FromAtomicMassUnits(130), t, settings);
        output.WriteLine($"light {light.Variance} classical {light.Classical.Variance}; heavy {heavy.Variance} classical {heavy.Classical.Variance}");
        Assert.True(light.Variance.Value > 2 * light.Classical.Variance.Value);
        Assert.Contains(light.Warnings, w => w.Code == WarningCodes.QuantumEffects && w.Message.Contains("underestimate the RMS spread", StringComparison.Ordinal));
        double heavyExcess = heavy.Variance.Value / heavy.Classical.Variance.Value - 1, lightExcess = light.Variance.Value / light.Classical.Variance.Value - 1;
        Assert.InRange(heavyExcess, 0.0, 0.2);
        Assert.True(lightExcess > 10 * heavyExcess);
        Assert.Matches("underestimate the RMS spread by ([4-9][0-9]|[1-9][0-9][0-9]) %", light.Warnings.First(w => w.Code == WarningCodes.QuantumEffects).Message);
        Assert.All(heavy.Warnings.Where(w => w.Code == WarningCodes.QuantumEffects), w => Assert.Matches("underestimate the RMS spread by [0-9] %", w.Message));
    }
}
