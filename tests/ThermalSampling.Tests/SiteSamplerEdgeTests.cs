using System;
using System.Collections.Generic;
using System.Globalization;
using System.Linq;
using System.Text.RegularExpressions;
using ThermalSampling.Statistics;
using ThermalSampling.Persistence;
using ThermalSampling.Analysis;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Randomness;
using ThermalSampling.Reports;
using ThermalSampling.Sampling;
using ThermalSampling.Units;
using Xunit;

namespace ThermalSampling.Tests;

/// <summary>
/// Small, fast checks of the site sampler's edges, written against what the site mutation mode can change
/// (docs/validation.md): every reported number rebuilt from the retained draws, the wall and escape warnings, the
/// boundary probe points, the Metropolis starts and step widths, the acceptance target, the progress totals, the
/// argument checks, the landscape fingerprint, the covariance accumulator and the log weight. A sheared cage far from the
/// origin (off-diagonal covariance) is also checked against three-dimensional quadrature, and the checkpoints' lane width,
/// finished temperatures and direct-chain counts are checked on resume.
/// </summary>
public class SiteSamplerEdgeTests
{
    private static readonly Mass ArgonMass = Mass.FromAtomicMassUnits(39.948);
    private static readonly LennardJones Lj = LennardJones.FromMinimum(Length.FromAngstroms(3.8), Energy.FromKelvin(119.8)); // Sources.Argon (eps)
    private static readonly Temperature Thirty = Temperature.FromKelvin(30);
    private static readonly Temperature[] ThirtyOnly = [Thirty];

    private static Position[] CageSites() => LatticeSites.NeighbourCage(LatticeKind.FaceCentredCubic, Length.FromAngstroms(3.8)).ToArray();

    /// <summary>Argon in its fcc neighbour cage (minimum at the origin), confined around <paramref name="centre"/>.</summary>
    private static SiteLandscape<LennardJones> Cage(Position centre, Confinement confinement) => SiteLandscape.Create(Lj, CageSites(), centre, confinement);

    private static readonly SiteLandscape<LennardJones> PlainCage = Cage(Position.Origin, Confinement.Sphere(Length.FromAngstroms(1.2)));

    /// <summary>The centre of symmetry, and so the minimum, of <see cref="Sheared"/>.</summary>
    private static readonly Position ShearedCentre = new(3.1, -1.7, 2.4);

    /// <summary>
    /// Invented: the argon cage sheared (x += 0.12 y, y += 0.1 z, z += 0.08 x) and moved to <see cref="ShearedCentre"/>, so
    /// that the minimum lies far from the origin and the harmonic covariance has off-diagonal elements: sign and offset
    /// errors that the cage at the origin, with its diagonal covariance, cannot show.
    /// </summary>
    private static SiteLandscape<LennardJones> Sheared(Position centre, Confinement confinement)
        => SiteLandscape.Create(Lj, CageSites().Select(q => ShearedCentre + new Position(q.X + 0.12 * q.Y, q.Y + 0.1 * q.Z, q.Z + 0.08 * q.X)), centre, confinement);

    private static SamplingSettings Small(SamplingMethod method, long samples = 4096) => new()
    {
        Seed = 11, Method = method, Chains = 2, SamplesPerChain = samples, BurnIn = 0, MaxThreads = 1,
    };

    private static Position[] AllDraws(SiteVibrationReport report) => report.Draws.Chains.SelectMany(c => c).ToArray();

    public static TheoryData<string> Shapes => new() { "sphere", "box" };

    public static TheoryData<string, bool> ShapesAndCages => new() { { "sphere", false }, { "box", false }, { "sphere", true }, { "box", true } };

    [Theory]
    [MemberData(nameof(ShapesAndCages))]
    public void Direct_draws_rebuild_every_reported_number(string shape, bool sheared)
    {
        // Every draw is kept, so the report's moments and histogram can be recomputed from them. The confinement is
        // centred 0.1 Å off the minimum, so the radial histogram must reach the far wall: size (sphere) or size·√3 (box
        // corner), plus the offset. Direct draws are independent, so the error bars must be those of N independent values
        // (common practice, no source): σ_i/√N for each mean component and √(Var|u − ū|²/N) for the MSD; 15 % allows for
        // the estimated ESS.
        const int n = 1 << 15, bins = 40;
        var confinement = shape == "sphere" ? Confinement.Sphere(Length.FromAngstroms(1.2)) : Confinement.Box(Length.FromAngstroms(0.9));
        var centre = (sheared ? ShearedCentre : Position.Origin) + new Position(0.1, 0, 0);
        var landscape = sheared ? Sheared(centre, confinement) : Cage(centre, confinement);
        var settings = Small(SamplingMethod.Direct, samples: n) with { RetainedDrawsPerChain = n, HistogramBins = bins };
        var report = SiteSampler.Run(landscape, ArgonMass, Thirty, settings);
        var draws = AllDraws(report);
        int total = draws.Length;
        Assert.Equal(2 * n, total);
        Assert.Equal(total, report.Diagnostics.Draws);

        double mx = draws.Average(p => p.X), my = draws.Average(p => p.Y), mz = draws.Average(p => p.Z);
        Assert.Equal(mx, report.Mean.X, 1e-13);
        Assert.Equal(my, report.Mean.Y, 1e-13);
        Assert.Equal(mz, report.Mean.Z, 1e-13);
        double C(Func<Position, double> a, Func<Position, double> b, double ma, double mb) => draws.Sum(p => (a(p) - ma) * (b(p) - mb)) / (total - 1);
        var cov = report.Covariance;
        Assert.Equal(C(p => p.X, p => p.X, mx, mx), cov.XX, 1e-9 * cov.XX);
        Assert.Equal(C(p => p.Y, p => p.Y, my, my), cov.YY, 1e-9 * cov.XX);
        Assert.Equal(C(p => p.Z, p => p.Z, mz, mz), cov.ZZ, 1e-9 * cov.XX);
        Assert.Equal(C(p => p.X, p => p.Y, mx, my), cov.XY, 1e-9 * cov.XX);
        Assert.Equal(C(p => p.X, p => p.Z, mx, mz), cov.XZ, 1e-9 * cov.XX);
        Assert.Equal(C(p => p.Y, p => p.Z, my, mz), cov.YZ, 1e-9 * cov.XX);
        double msd = report.MeanSquareDisplacement.Value;
        Assert.Equal(cov.XX + cov.YY + cov.ZZ, msd, 1e-12 * msd);
        Assert.Equal(report.Mean - report.Minimum, report.MeanShift);

        Assert.Equal(Math.Sqrt(cov.XX / total), report.MeanStandardError.X, 0.15 * Math.Sqrt(cov.XX / total));
        Assert.Equal(Math.Sqrt(cov.YY / total), report.MeanStandardError.Y, 0.15 * Math.Sqrt(cov.YY / total));
        Assert.Equal(Math.Sqrt(cov.ZZ / total), report.MeanStandardError.Z, 0.15 * Math.Sqrt(cov.ZZ / total));
        var q = draws.Select(p => (p.X - mx) * (p.X - mx) + (p.Y - my) * (p.Y - my) + (p.Z - mz) * (p.Z - mz)).ToArray();
        double qMean = q.Average(), qVar = q.Sum(v => (v - qMean) * (v - qMean)) / (total - 1);
        Assert.Equal(Math.Sqrt(qVar / total), report.MeanSquareDisplacement.StandardError, 0.15 * Math.Sqrt(qVar / total));
        double b = 8 * Math.PI * Math.PI * msd / 3; // Sources.DebyeWaller
        Assert.Equal(b, report.DebyeWallerB!.Value, 1e-12 * b);
        Assert.Equal(b * report.MeanSquareDisplacement.StandardError / msd, report.DebyeWallerB.StandardError, 1e-12 * b);

        var h = report.RadialHistogram;
        double offset = (report.Minimum - centre).Norm;
        Assert.Equal(0.1, offset, 1e-6);
        double reach = shape == "sphere" ? 1.2 : 0.9 * Math.Sqrt(3);
        Assert.Equal(0, h.Lower);
        Assert.Equal(reach + offset, h.Upper, 1e-12);
        Assert.Equal(bins, h.Density.Length);
        Assert.Equal(total, h.Count);
        var counts = new long[bins];
        double scale = bins / (h.Upper - h.Lower);
        foreach (var p in draws)
        {
            double r = (p - report.Minimum).Norm;
            counts[Math.Min((int)(r * scale), bins - 1)]++;
        }
        for (int i = 0; i < bins; i++)
        {
            Assert.Equal(counts[i] / (double)total / h.BinWidth, h.Density[i], 1e-9 * (1 + h.Density[i]));
        }

        // Envelope draws outside the confinement or rejected are proposals too; the run stays far above the 0.1 % floor.
        Assert.InRange(report.Diagnostics.AcceptanceRate!.Value, 0.05, 0.999);
        Assert.Null(report.Diagnostics.FinalStepWidthInAngstroms);
        Assert.NotNull(report.Diagnostics.RHat);
        Assert.NotEqual(report.Draws.Chains[0][0], report.Draws.Chains[1][0]);

        // The diagnostics, rebuilt from the same draws by the same batch-mean rules: the slowest axis's τ, the smallest ESS
        // and the largest R-hat of the three axes, the x axis's blocking error, each axis's mean error from its own ESS,
        // and the MSD error from the batch means of |u − ū|² summed over the three axes.
        var min = report.Minimum;
        var stores = report.Draws.Chains.Select(chain =>
        {
            var axis = new[]
            {
                new BatchMeansStore(n, settings.MaxDiagnosticValuesPerChain, min.X), new BatchMeansStore(n, settings.MaxDiagnosticValuesPerChain, min.Y),
                new BatchMeansStore(n, settings.MaxDiagnosticValuesPerChain, min.Z),
            };
            foreach (var p in chain)
            {
                axis[0].Add(p.X);
                axis[1].Add(p.Y);
                axis[2].Add(p.Z);
            }
            return axis;
        }).ToArray();
        double[] variances = [cov.XX, cov.YY, cov.ZZ];
        var axes = Enumerable.Range(0, 3)
            .Select(i => ChainDiagnostics.Summarise(stores.Select(st => st[i].Means()).ToList(), stores[0][0].BatchSize, n, variances[i])).ToArray();
        var d = report.Diagnostics;
        Assert.Equal(axes.Max(a => a.Tau), d.AutocorrelationTime);
        Assert.Equal(axes.Min(a => a.Ess), d.EffectiveSampleSize);
        Assert.Equal(axes.Max(a => a.RHat!.Value), d.RHat!.Value);
        Assert.Equal(axes[0].BlockingStandardError, d.BlockingStandardError);
        Assert.Equal(new Position(Math.Sqrt(cov.XX / axes[0].Ess), Math.Sqrt(cov.YY / axes[1].Ess), Math.Sqrt(cov.ZZ / axes[2].Ess)), report.MeanStandardError);
        double[] mean = [report.Mean.X, report.Mean.Y, report.Mean.Z];
        var msdSeries = stores.Select(st =>
        {
            var sx = st[0].SquaredDeviationMeans(mean[0]);
            var sy = st[1].SquaredDeviationMeans(mean[1]);
            var sz = st[2].SquaredDeviationMeans(mean[2]);
            return sx.Select((v, i) => v + sy[i] + sz[i]).ToArray();
        }).ToList();
        Assert.Equal(ChainDiagnostics.PooledMeanStandardError(msdSeries), report.MeanSquareDisplacement.StandardError);
        // Direct draws have no proposal width to tune, so their acceptance is never compared with the Metropolis target.
        Assert.DoesNotContain(report.Warnings, w => w.Code == WarningCodes.AcceptanceOffTarget);
        // One chain has no R-hat.
        Assert.Null(SiteSampler.Run(landscape, ArgonMass, Thirty, Small(SamplingMethod.Direct) with { Chains = 1 }).Diagnostics.RHat);

        // The classical-validity verdict comes first among the warnings, from inputs computed here: the RMS spread per
        // direction √(MSD/3), the largest ħω/kT of the modes, the lowest energy on the boundary probe points above the
        // minimum, and the fraction of draws within one harmonic RMS spread of the wall, counted about the confinement's centre.
        double band = Math.Sqrt(report.Harmonic.ClassicalMeanSquareDisplacement / 3);
        double wallMass = draws.Count(p => confinement.DistanceToWall(p.X - centre.X, p.Y - centre.Y, p.Z - centre.Z) < band) / (double)total;
        double barrier = SiteChains.BoundaryPoints(landscape, 2000).Min(p => landscape.Energy(p)) - report.Harmonic.MinimumEnergyInElectronVolts;
        var validity = ClassicalValidity.Assess(ArgonMass, Thirty, Math.Sqrt(msd / 3), report.Harmonic.Modes.Max(m => m.QuantumToThermalRatio), barrier, wallMass);
        Assert.Contains(validity.Warnings, w => w.Code == WarningCodes.DeBroglieWavelength); // its message carries the RMS spread
        string[] validityCodes = [WarningCodes.QuantumEffects, WarningCodes.DeBroglieWavelength, WarningCodes.EscapeRisk, WarningCodes.WallMass];
        // The quantum-effects warning keeps the verdict's first sentence and then gives the exact quantum number, or why
        // there is none (SiteSummary.Verdict); every other validity warning is as assessed.
        static Warning Stem(Warning w) => w.Code == WarningCodes.QuantumEffects
            ? w with { Message = w.Message.Replace(ClassicalValidity.QuantumAdvice, "").Split(" No exact quantum reference")[0].Split(" Classical statistics underestimate")[0].Split(" Classical statistics overestimate")[0] }
            : w;
        Assert.Equal(validity.Warnings.Select(Stem), report.Warnings.Where(w => validityCodes.Contains(w.Code)).Select(Stem));
        Assert.Equal(validity.Warnings.Select(Stem), report.Warnings.Take(validity.Warnings.Length).Select(Stem));
        Assert.All(report.Warnings.Where(w => w.Code == WarningCodes.QuantumEffects),
            w => Assert.Matches("No exact quantum reference here|the exact quantum MSD", w.Message));
    }

    [Theory]
    [InlineData(SamplingMethod.Metropolis)]
    [InlineData(SamplingMethod.Direct)]
    public void A_tight_confinement_is_reported_with_the_fraction_of_draws_beside_its_wall_and_the_escape_barrier(SamplingMethod method)
    {
        // Invented: the argon cage at 30 K held in a sphere of 0.3 Å, under three harmonic RMS spreads. The wall mass is
        // the fraction of draws within one harmonic RMS spread √(tr Σ/3) of the wall; every draw is kept, so it can be
        // counted here and must print the same. The way out of this cage is the confinement wall (no other minimum lies
        // inside 0.3 Å), and the escape warning names it: the lowest energy on the confinement's surface above the minimum,
        // found here by an independent 181 × 360 grid in angles.
        const int n = 1 << 14;
        var sphere = Confinement.Sphere(Length.FromAngstroms(0.3));
        var landscape = Cage(Position.Origin, sphere);
        var settings = Small(method, samples: n) with { BurnIn = 4096, RetainedDrawsPerChain = n };
        var report = SiteSampler.Run(landscape, ArgonMass, Thirty, settings);
        double band = Math.Sqrt(report.Harmonic.ClassicalMeanSquareDisplacement / 3);
        var draws = AllDraws(report);
        double near = draws.Count(p => sphere.DistanceToWall(p.X, p.Y, p.Z) < band) / (double)draws.Length;
        Assert.InRange(near, 0.1, 0.9);
        var wall = Assert.Single(report.Warnings, w => w.Code == WarningCodes.WallMass);
        Assert.StartsWith(near.ToString("P1", CultureInfo.InvariantCulture) + " of the draws lie within one harmonic RMS spread (" + band.ToString("G3", CultureInfo.InvariantCulture) + " Å) of the confinement", wall.Message);

        double lowest = double.PositiveInfinity;
        for (int i = 0; i <= 180; i++)
        {
            for (int j = 0; j < 360; j++)
            {
                double theta = Math.PI * i / 180, phi = 2 * Math.PI * j / 360;
                var p = new Position(0.3 * Math.Sin(theta) * Math.Cos(phi), 0.3 * Math.Sin(theta) * Math.Sin(phi), 0.3 * Math.Cos(theta));
                lowest = Math.Min(lowest, landscape.Energy(p));
            }
        }
        double barrier = lowest - report.Harmonic.MinimumEnergyInElectronVolts;
        var escape = Assert.Single(report.Warnings, w => w.Code == WarningCodes.EscapeRisk);
        var match = Regex.Match(escape.Message, @"the rise from the minimum to the confinement wall \(([-0-9.eE+]+) eV;");
        Assert.True(match.Success, escape.Message);
        Assert.Equal(barrier, double.Parse(match.Groups[1].Value, CultureInfo.InvariantCulture), 2e-3 * barrier);
    }

    [Fact]
    public void Direct_sampling_never_compares_its_acceptance_with_the_metropolis_target()
    {
        // A sphere of 0.1 Å: most envelope draws fall outside it, so the acceptance is far from 0.31, and still no
        // acceptance-target warning (there is no proposal width to tune).
        var report = SiteSampler.Run(Cage(Position.Origin, Confinement.Sphere(Length.FromAngstroms(0.1))), ArgonMass, Thirty, Small(SamplingMethod.Direct));
        Assert.True(Math.Abs(report.Diagnostics.AcceptanceRate!.Value - SiteSampler.DefaultTargetAcceptance) > 0.15, $"acceptance {report.Diagnostics.AcceptanceRate}");
        Assert.DoesNotContain(report.Warnings, w => w.Code == WarningCodes.AcceptanceOffTarget);
    }

    [Fact]
    public void Direct_sampling_accepts_the_share_of_envelope_draws_that_its_documented_envelope_and_bound_give()
    {
        // Rejection sampling of p from proposals q under a bound M ≥ p/q accepts the fraction Z_p/(M·Z_q) of its
        // proposals (common practice, no source). Here p = e^(−β(E − E_min)) over a box of 0.4 Å (by quadrature; draws
        // outside the box count as rejected proposals), q = e^(−½|ξ|²) with the documented envelope N(min, 1.3²Σ), so
        // Z_q = (2π)^(3/2)·1.3³·√det Σ, and ln M is the largest probed ln(p/q) plus the documented 5% margin. In this cage
        // ln(p/q) peaks at the minimum, where it is 0 (checked on a grid below), so ln M = 0.05. A sampler that accepted
        // against e^(+ln M), or mis-scaled its envelope, would accept about 10% more or less; four standard errors of
        // the binomial acceptance are about 1%.
        const double half = 0.4;
        var landscape = Cage(Position.Origin, Confinement.Box(Length.FromAngstroms(half)));
        var report = SiteSampler.Run(landscape, ArgonMass, Thirty, Small(SamplingMethod.Direct, samples: 1 << 15));
        var sigma = report.Harmonic.ClassicalCovariance.ToMatrix();
        var envelopePrecision = (1.3 * 1.3 * sigma).Inverse();
        double beta = 1 / Thirty.ThermalEnergyInElectronVolts, e0 = landscape.Energy(Position.Origin);
        double peak = double.NegativeInfinity;
        for (int i = -20; i <= 20; i++)
        {
            for (int j = -20; j <= 20; j++)
            {
                for (int k = -20; k <= 20; k++)
                {
                    var u = MathNet.Numerics.LinearAlgebra.Vector<double>.Build.Dense([half * i / 20, half * j / 20, half * k / 20]);
                    double logRatio = -beta * (landscape.Energy(new Position(u[0], u[1], u[2])) - e0) + 0.5 * u.DotProduct(envelopePrecision * u);
                    peak = Math.Max(peak, logRatio);
                }
            }
        }
        Assert.Equal(0, peak, 1e-9);

        var (zp, _, _, _) = BoxMoments(landscape, Position.Origin, half, Thirty);
        double zq = Math.Pow(2 * Math.PI, 1.5) * Math.Pow(1.3, 3) * Math.Sqrt(sigma.Determinant());
        double expected = zp / zq * Math.Exp(-0.05);
        double acceptance = report.Diagnostics.AcceptanceRate!.Value;
        double proposals = report.Diagnostics.Draws / acceptance;
        double se = Math.Sqrt(expected * (1 - expected) / proposals);
        Assert.True(Math.Abs(acceptance - expected) < 4 * se, $"acceptance {acceptance:F5} against {expected:F5} ± {se:F5}");
    }

    [Fact]
    public void A_roomy_confinement_raises_no_wall_or_escape_warning()
    {
        // The plain cage at 30 K in 1.2 Å: about ten RMS spreads to the wall, where the energy is far above kT.
        var report = SiteSampler.Run(PlainCage, ArgonMass, Thirty, Small(SamplingMethod.Direct, samples: 8192));
        Assert.DoesNotContain(report.Warnings, w => w.Code == WarningCodes.WallMass);
        Assert.DoesNotContain(report.Warnings, w => w.Code == WarningCodes.EscapeRisk);
    }

    [Theory]
    [MemberData(nameof(Shapes))]
    public void Boundary_probe_points_lie_on_the_wall_and_cover_it_evenly(string shape)
    {
        // A golden-angle (Fibonacci) spiral of unit vectors, z = 1 − 2(i + ½)/n, put on the wall just inside it
        // (common practice, no source). Even coverage: each octant gets an eighth of the points within 1 %.
        const int n = 2000;
        var centre = new Position(0.3, -0.2, 0.1);
        var confinement = shape == "sphere" ? Confinement.Sphere(Length.FromAngstroms(1.2)) : Confinement.Box(Length.FromAngstroms(0.9));
        var points = SiteChains.BoundaryPoints(Cage(centre, confinement), n).ToArray();
        Assert.Equal(n, points.Length);
        var octants = new int[8];
        for (int i = 0; i < n; i++)
        {
            var d = points[i] - centre;
            if (shape == "sphere")
            {
                Assert.Equal(1.2, d.Norm, 1e-11);
                Assert.Equal(1.2 * (1 - 2 * (i + 0.5) / n), d.Z, 1e-11);
            }
            else
            {
                Assert.Equal(0.9, Math.Max(Math.Abs(d.X), Math.Max(Math.Abs(d.Y), Math.Abs(d.Z))), 1e-11);
            }
            Assert.True(confinement.Contains(d.X, d.Y, d.Z), $"point {i} is outside");
            octants[(d.X > 0 ? 1 : 0) + (d.Y > 0 ? 2 : 0) + (d.Z > 0 ? 4 : 0)]++;
        }
        Assert.All(octants, k => Assert.InRange(k, n / 8 - 20, n / 8 + 20));
    }

    [Theory]
    [InlineData(false)]
    [InlineData(true)]
    public void Metropolis_chains_start_two_harmonic_spreads_out_along_their_own_streams(bool sheared)
    {
        // Chain c starts at min + 2·L·ξ, with L the Cholesky factor of the harmonic covariance and ξ the first three
        // normal deviates of chain c's stream (retried until inside). A step of 1e-9 Å and no burn-in keep each chain's
        // first draw at its start, and the reported step width stays the one asked for.
        var settings = Small(SamplingMethod.Metropolis) with { Chains = 3, InitialStepWidthInAngstroms = 1e-9, RetainedDrawsPerChain = 1 };
        var landscape = sheared ? Sheared(ShearedCentre, Confinement.Sphere(Length.FromAngstroms(1.2))) : PlainCage;
        var report = SiteSampler.Run(landscape, ArgonMass, Thirty, settings);
        var l = report.Harmonic.ClassicalCovariance.ToMatrix().Cholesky().Factor;
        Assert.True(!sheared || Math.Abs(l[1, 0]) > 0.05 * l[1, 1] && Math.Abs(l[2, 0]) > 0.05 * l[2, 2] && Math.Abs(l[2, 1]) > 0.05 * l[2, 2],
            $"the sheared cage's Cholesky factor is nearly diagonal: {l}");
        var min = report.Minimum;
        double sigma = Math.Sqrt(report.Harmonic.ClassicalMeanSquareDisplacement / 3);
        for (int c = 0; c < 3; c++)
        {
            var random = RandomStream.ForChain(11, c);
            double a = 2 * random.NextStandardNormal(), b = 2 * random.NextStandardNormal(), z = 2 * random.NextStandardNormal();
            var expected = min + new Position(l[0, 0] * a, l[1, 0] * a + l[1, 1] * b, l[2, 0] * a + l[2, 1] * b + l[2, 2] * z);
            var first = report.Draws.Chains[c][0];
            Assert.True((first - expected).Norm < 1e-7, $"chain {c}: {first} against {expected}");
            Assert.True((first - min).Norm > 0.5 * sigma, $"chain {c} starts at the minimum");
        }
        Assert.Equal(1e-9, report.Diagnostics.FinalStepWidthInAngstroms!.Value, 1e-20);
    }

    [Fact]
    public void A_metropolis_chain_with_no_start_inside_after_a_hundred_tries_starts_at_the_minimum()
    {
        // A sphere of 0.002 Å about the minimum: none of a chain's first 100 start candidates (two harmonic spreads out)
        // falls inside it, which is checked here from each chain's stream, so every chain starts at the minimum itself.
        var landscape = Cage(Position.Origin, Confinement.Sphere(Length.FromAngstroms(0.002)));
        var settings = Small(SamplingMethod.Metropolis) with { Chains = 2, InitialStepWidthInAngstroms = 1e-9, RetainedDrawsPerChain = 1 };
        var report = SiteSampler.Run(landscape, ArgonMass, Thirty, settings);
        var l = report.Harmonic.ClassicalCovariance.ToMatrix().Cholesky().Factor;
        var min = report.Minimum;
        for (int c = 0; c < 2; c++)
        {
            var random = RandomStream.ForChain(11, c);
            for (int attempt = 0; attempt < 100; attempt++)
            {
                double a = 2 * random.NextStandardNormal(), b = 2 * random.NextStandardNormal(), z = 2 * random.NextStandardNormal();
                Assert.False(landscape.Contains(min + new Position(l[0, 0] * a, l[1, 0] * a + l[1, 1] * b, l[2, 0] * a + l[2, 1] * b + l[2, 2] * z)));
            }
            Assert.True((report.Draws.Chains[c][0] - min).Norm < 1e-7, $"chain {c} starts at {report.Draws.Chains[c][0]}, not at the minimum {min}");
        }
    }

    /// <summary>
    /// The weight e^(−β(E − E(<paramref name="centre"/>))) integrated over the box of half-width <paramref name="half"/> Å
    /// about <paramref name="centre"/> by a product Gauss–Legendre rule (MathNet.Numerics; 8 panels of 12 nodes per axis):
    /// its integral, its first moments, its second moments and the moments E[u_a²u_b²], all of u = r − centre and not yet
    /// divided by the integral.
    /// </summary>
    private static (double Z, double[] First, double[,] Second, double[,] Fourth) BoxMoments(SiteLandscape<LennardJones> landscape, Position centre, double half, Temperature temperature)
    {
        double beta = 1 / temperature.ThermalEnergyInElectronVolts, e0 = landscape.Energy(centre);
        var nodes = new List<(double U, double W)>();
        for (int panel = 0; panel < 8; panel++)
        {
            var rule = new MathNet.Numerics.Integration.GaussLegendreRule(-half + panel * half / 4, -half + (panel + 1) * half / 4, 12);
            nodes.AddRange(rule.Abscissas.Zip(rule.Weights));
        }
        double z0 = 0;
        var first = new double[3];
        var second = new double[3, 3];
        var fourth = new double[3, 3];
        foreach (var (x, wx) in nodes)
        {
            foreach (var (y, wy) in nodes)
            {
                foreach (var (z, wz) in nodes)
                {
                    double w = wx * wy * wz * Math.Exp(-beta * (landscape.Energy(centre + new Position(x, y, z)) - e0));
                    double[] u = [x, y, z];
                    z0 += w;
                    for (int a = 0; a < 3; a++)
                    {
                        first[a] += w * u[a];
                        for (int b = 0; b < 3; b++)
                        {
                            second[a, b] += w * u[a] * u[b];
                            fourth[a, b] += w * u[a] * u[a] * u[b] * u[b];
                        }
                    }
                }
            }
        }
        return (z0, first, second, fourth);
    }

    [Theory]
    [InlineData(SamplingMethod.Direct, 30)]
    [InlineData(SamplingMethod.Metropolis, 30)]
    [InlineData(SamplingMethod.Direct, 90)]
    public void The_sheared_cage_far_from_the_origin_gives_the_moments_of_three_dimensional_quadrature(SamplingMethod method, double kelvin)
    {
        // 90 K is a second point, further from the harmonic limit, for the direct sampler's envelope.
        // Reference: the mean and covariance of the Boltzmann weight e^(−E/kT) over the box, by a product Gauss–Legendre
        // rule (MathNet.Numerics; 8 panels of 12 nodes per axis), with the error of each covariance element from its
        // fourth moment, √((E[u_a²u_b²] − C_ab²)/ESS) (common practice, no source). Five standard errors.
        const double half = 0.4;
        var landscape = Sheared(ShearedCentre, Confinement.Box(Length.FromAngstroms(half)));
        var temperature = Temperature.FromKelvin(kelvin);
        var (z0, first, second, fourth) = BoxMoments(landscape, ShearedCentre, half, temperature);
        var reference = new double[3, 3];
        for (int a = 0; a < 3; a++)
        {
            for (int b = 0; b < 3; b++)
            {
                reference[a, b] = second[a, b] / z0 - first[a] * first[b] / (z0 * z0);
            }
        }
        Assert.True(Math.Abs(reference[0, 1]) > 0.1 * Math.Sqrt(reference[0, 0] * reference[1, 1]), $"x–y correlation too weak: {reference[0, 1]}");

        var settings = Small(method, samples: 60_000) with { Chains = 3, BurnIn = method == SamplingMethod.Metropolis ? 5000 : 0 };
        var report = SiteSampler.Run(landscape, ArgonMass, temperature, settings);
        double[] mean = [report.Mean.X - ShearedCentre.X, report.Mean.Y - ShearedCentre.Y, report.Mean.Z - ShearedCentre.Z];
        double[] se = [report.MeanStandardError.X, report.MeanStandardError.Y, report.MeanStandardError.Z];
        var cov = report.Covariance;
        double[,] sampled = { { cov.XX, cov.XY, cov.XZ }, { cov.XY, cov.YY, cov.YZ }, { cov.XZ, cov.YZ, cov.ZZ } };
        double ess = report.Diagnostics.EffectiveSampleSize;
        for (int a = 0; a < 3; a++)
        {
            Assert.True(Math.Abs(mean[a] - first[a] / z0) < 5 * se[a], $"mean {a}: {mean[a]} against {first[a] / z0} ± {se[a]}");
            for (int b = a; b < 3; b++)
            {
                double seAb = Math.Sqrt((fourth[a, b] / z0 - reference[a, b] * reference[a, b]) / ess);
                Assert.True(Math.Abs(sampled[a, b] - reference[a, b]) < 5 * seAb, $"covariance {a}{b}: {sampled[a, b]} against {reference[a, b]} ± {seAb}");
            }
        }
    }

    [Fact]
    public void Metropolis_step_widths_default_to_the_optimal_scaling_and_are_capped_at_twice_the_confinement()
    {
        // Without burn-in the width is never adapted. The default is 2.38/√d times the narrowest harmonic spread, d = 3
        // ([paper] Roberts, Gelman & Gilks 1997); a width asked for beyond 2 × the confinement size is cut to it.
        var plain = SiteSampler.Run(PlainCage, ArgonMass, Thirty, Small(SamplingMethod.Metropolis));
        double sigmaMin = Math.Sqrt(plain.Harmonic.Modes.Min(m => m.ClassicalVarianceInAngstromsSquared));
        Assert.Equal(2.38 / Math.Sqrt(3) * sigmaMin, plain.Diagnostics.FinalStepWidthInAngstroms!.Value, 1e-12);
        // The sheared cage's modes differ, so the narrowest one is the one that counts.
        var sheared = SiteSampler.Run(Sheared(ShearedCentre, Confinement.Sphere(Length.FromAngstroms(1.2))), ArgonMass, Thirty, Small(SamplingMethod.Metropolis));
        var variances = sheared.Harmonic.Modes.Select(m => m.ClassicalVarianceInAngstromsSquared).ToArray();
        Assert.True(variances.Max() > 1.2 * variances.Min(), $"the sheared cage's modes are nearly equal: {string.Join(", ", variances)}");
        Assert.Equal(2.38 / Math.Sqrt(3) * Math.Sqrt(variances.Min()), sheared.Diagnostics.FinalStepWidthInAngstroms!.Value, 1e-12);
        var wide = SiteSampler.Run(PlainCage, ArgonMass, Thirty, Small(SamplingMethod.Metropolis) with { InitialStepWidthInAngstroms = 100 });
        Assert.Equal(2 * 1.2, wide.Diagnostics.FinalStepWidthInAngstroms!.Value, 1e-12);
        Assert.True(wide.Diagnostics.AcceptanceRate < 0.05, $"acceptance {wide.Diagnostics.AcceptanceRate}");
        Assert.Contains(wide.Warnings, w => w.Code == WarningCodes.AcceptanceOffTarget);
    }

    [Theory]
    [InlineData(null)]
    [InlineData(0.5)]
    public void Metropolis_adapts_its_step_to_the_requested_acceptance(double? target)
    {
        // After a long burn-in the sampling phase accepts close to the target, 0.31 by default (common practice, no
        // source; 0.05 is a margin for the chains' noise).
        var settings = Small(SamplingMethod.Metropolis, samples: 20_000) with { BurnIn = 20_000, TargetAcceptance = target };
        var report = SiteSampler.Run(PlainCage, ArgonMass, Thirty, settings);
        double expected = target ?? SiteSampler.DefaultTargetAcceptance;
        Assert.Equal(0.31, SiteSampler.DefaultTargetAcceptance);
        Assert.InRange(report.Diagnostics.AcceptanceRate!.Value, expected - 0.05, expected + 0.05);
        Assert.DoesNotContain(report.Warnings, w => w.Code == WarningCodes.AcceptanceOffTarget);
    }

    [Theory]
    [InlineData(SamplingMethod.Metropolis, 4096 + 8192)]
    [InlineData(SamplingMethod.Direct, 8192)]
    public void Progress_counts_burn_in_only_for_metropolis(SamplingMethod method, long expectedTotal)
    {
        var (seen, sink) = PairSamplerEdgeTests.ProgressLog();
        SiteSampler.Run(PlainCage, ArgonMass, Thirty, Small(method, samples: 8192) with { BurnIn = 4096 }, sink);
        Assert.NotEmpty(seen);
        Assert.All(seen, p => Assert.Equal(expectedTotal, p.ChainStepsTotal));
        Assert.Contains(seen, p => p.ChainStepsDone == expectedTotal && p.ChainIndex == 1);
    }

    [Fact]
    public void Every_entry_point_checks_its_arguments_before_any_work()
    {
        var settings = Small(SamplingMethod.Direct);
        var options = new CheckpointOptions(TimeSpan.FromHours(1), _ => { });
        Assert.Equal("landscape", Assert.Throws<ArgumentNullException>(() => SiteSampler.Run<LennardJones>(null!, ArgonMass, Thirty, settings)).ParamName);
        Assert.Equal("settings", Assert.Throws<ArgumentNullException>(() => SiteSampler.Run(PlainCage, ArgonMass, Thirty, null!)).ParamName);
        Assert.Contains("Chains", Assert.ThrowsAny<ArgumentException>(() => SiteSampler.Run(PlainCage, ArgonMass, Thirty, settings with { Chains = 0 })).Message);
        Assert.Contains("mass", Assert.ThrowsAny<ArgumentException>(() => SiteSampler.Run(PlainCage, default, Thirty, settings)).Message);
        Assert.Contains("temperature", Assert.ThrowsAny<ArgumentException>(() => SiteSampler.Run(PlainCage, ArgonMass, default, settings)).Message);
        Assert.Equal("temperatures", Assert.Throws<ArgumentException>(() => SiteSampler.Sweep(PlainCage, ArgonMass, Array.Empty<Temperature>(), settings)).ParamName);
        Assert.Equal("checkpoints", Assert.Throws<ArgumentNullException>(() =>
            SiteSampler.SweepWithCheckpoints(PlainCage, ArgonMass, ThirtyOnly, settings, null!)).ParamName);
        Assert.Equal("checkpoint", Assert.Throws<ArgumentNullException>(() =>
            SiteSampler.Resume(PlainCage, ArgonMass, ThirtyOnly, settings, null!)).ParamName);
        // A checkpointed sweep checks its settings and every temperature before it runs any.
        Assert.Contains("Chains", Assert.ThrowsAny<ArgumentException>(() =>
            SiteSampler.SweepWithCheckpoints(PlainCage, ArgonMass, ThirtyOnly, settings with { Chains = 0 }, options)).Message);
        Assert.Contains("greater than 0", Assert.ThrowsAny<ArgumentException>(() =>
            SiteSampler.SweepWithCheckpoints(PlainCage, ArgonMass, [Thirty, default], settings, options)).Message);
    }

    private static readonly SamplingSettings ShortDirect = Small(SamplingMethod.Direct, samples: 3 * 4096);

    /// <summary>The first checkpoint of a short direct run of <paramref name="landscape"/> at 30 K.</summary>
    private static SamplingCheckpoint FirstCheckpoint(SiteLandscape<LennardJones> landscape)
    {
        var saved = new List<SamplingCheckpoint>();
        SiteSampler.SweepWithCheckpoints(landscape, ArgonMass, ThirtyOnly, ShortDirect, new CheckpointOptions(TimeSpan.FromHours(1), saved.Add));
        return saved[0];
    }

    [Fact]
    public void A_resumed_direct_run_continues_from_its_saved_draws_instead_of_drawing_them_again()
    {
        // Direct draws depend only on the seed, so a resume that ignored the saved state would still give the same bits;
        // the progress it reports shows where each chain took up again.
        var saved = new List<SamplingCheckpoint>();
        var reference = SiteSampler.SweepWithCheckpoints(PlainCage, ArgonMass, ThirtyOnly, ShortDirect, new CheckpointOptions(TimeSpan.Zero, saved.Add));
        var last = saved[^1];
        var (seen, sink) = PairSamplerEdgeTests.ProgressLog();
        var resumed = SiteSampler.Resume(PlainCage, ArgonMass, ThirtyOnly, ShortDirect, last, null, sink);
        Assert.Equal(reference[0].Mean, resumed[0].Mean);
        Assert.Equal(reference[0].Covariance, resumed[0].Covariance);
        Assert.Contains(seen.GroupBy(p => p.ChainIndex), chain => chain.Min(p => p.ChainStepsDone) > 0);
        Assert.DoesNotContain(seen, p => p.ChainStepsDone == 0 && p.ChainIndex == 0);
    }

    [Theory]
    [InlineData(SamplingMethod.Metropolis)]
    [InlineData(SamplingMethod.Direct)]
    public void Checkpoints_record_their_lane_width_and_finished_temperatures_and_a_resume_keeps_the_width_with_other_threads(SamplingMethod method)
    {
        // Four chains on one thread: Metropolis packs them into one group of ChooseLanes(4, 1) lanes, direct sampling
        // uses one chain per group. A resume on four threads (which alone would choose one lane) must keep the
        // checkpoint's width, or its groups would not match.
        var settings = Small(method, samples: 3 * 4096) with { Chains = 4, BurnIn = 4096 };
        Temperature[] temperatures = [Thirty, Temperature.FromKelvin(40)];
        var saved = new List<SamplingCheckpoint>();
        var reference = SiteSampler.SweepWithCheckpoints(PlainCage, ArgonMass, temperatures, settings, new CheckpointOptions(TimeSpan.Zero, saved.Add));
        int lanes = method == SamplingMethod.Metropolis ? LaneGroups.ChooseLanes(4, 1, null) : 1;
        Assert.All(saved, c => Assert.Equal(lanes, c.ChainsPerVector));
        long firstTemperature = saved[0].ChainStepsTotal / 2;
        var second = saved.Where(c => c.ChainStepsDone > firstTemperature && c.ChainStepsDone < saved[0].ChainStepsTotal).ToList();
        Assert.NotEmpty(second);
        Assert.All(second, c => Assert.Equal(1, c.FinishedTemperatures));
        Assert.All(saved.Where(c => c.ChainStepsDone < firstTemperature), c => Assert.Equal(0, c.FinishedTemperatures));
        var resumed = SiteSampler.Resume(PlainCage, ArgonMass, temperatures, settings with { MaxThreads = 4 }, second[second.Count / 2]);
        for (int t = 0; t < 2; t++)
        {
            Assert.Equal(reference[t].Mean, resumed[t].Mean);
            Assert.Equal(reference[t].Covariance, resumed[t].Covariance);
        }
    }

    [Theory]
    [InlineData("DONE", 0, "the draws done = {0} is outside 0 to 12288.")]
    [InlineData("CREC", 1, "the accepted proposals = {1} is outside 0 to {0}.")]
    [InlineData("CREC", 3, "the draws near the wall = {0} is outside 0 to {1}.")]
    public void A_signed_checkpoint_whose_direct_chain_counts_are_impossible_is_refused_naming_the_count(string section, int index, string message)
    {
        // A correctly signed file (as another writer would make it) whose first direct chain holds a count outside its range:
        // more draws done (DONE, after the 4-word RAND section) than the run asks for; in its record (CREC: chain, proposals,
        // accepted, draws near the wall, draws outside the basin) fewer proposals than accepted draws, or more draws near
        // the wall than draws.
        var saved = new List<SamplingCheckpoint>();
        SiteSampler.SweepWithCheckpoints(PlainCage, ArgonMass, ThirtyOnly, ShortDirect, new CheckpointOptions(TimeSpan.Zero, saved.Add));
        var stream = new System.IO.MemoryStream();
        saved[saved.Count / 2].WriteTo(stream);
        var (metadata, body) = CheckpointFormatTests.Split(stream.ToArray());
        int rand = body.AsSpan().IndexOf("RAND"u8);
        int done = rand + 12 + 32;
        int record = done + 12 + 8;
        Assert.True(rand > 0 && body.AsSpan(done, 4).SequenceEqual("DONE"u8) && body.AsSpan(record, 4).SequenceEqual("CREC"u8), "no RAND section followed by DONE and CREC");
        long draws = BitConverter.ToInt64(body, done + 12);
        long value = section == "DONE" ? ShortDirect.SamplesPerChain + 1 : index == 1 ? draws - 1 : draws + 1;
        CheckpointFormatTests.Long(value).CopyTo(body, (section == "DONE" ? done : record) + 12 + 8 * index);
        var forged = SamplingCheckpoint.ReadFrom(new System.IO.MemoryStream(CheckpointFormatTests.Forge(metadata, body)));
        var ex = Assert.Throws<CheckpointException>(() => SiteSampler.Resume(PlainCage, ArgonMass, ThirtyOnly, ShortDirect, forged));
        Assert.Contains("state of direct site chain ", ex.Message, StringComparison.Ordinal);
        Assert.Contains(string.Format(CultureInfo.InvariantCulture, message, value, draws), ex.Message, StringComparison.Ordinal);
    }

    public static TheoryData<string> Changes => new() { "centre", "size", "site", "potential" };

    [Theory]
    [MemberData(nameof(Changes))]
    public void The_landscape_fingerprint_sees_changes_the_description_rounds_away(string change)
    {
        // Invented: the cage confined around (0.1, 0, 0) Å, and the same with the centre, the size or one site moved by
        // 1e-7 Å, or the well depth changed by one part in 10⁷ (seen only through the energies on the fingerprint's grid),
        // which the description (six significant digits) does not show. A checkpoint of the one must not resume the other.
        var original = Cage(new Position(0.1, 0, 0), Confinement.Sphere(Length.FromAngstroms(1.2)));
        var sites = CageSites();
        var centre = new Position(0.1, 0, 0);
        double size = 1.2;
        var potential = Lj;
        switch (change)
        {
            case "centre": centre = new Position(0.1000001, 0, 0); break;
            case "size": size = 1.2000001; break;
            case "potential": potential = LennardJones.FromMinimum(Length.FromAngstroms(3.8), Energy.FromKelvin(119.8 * (1 + 1e-7))); break;
            default: sites[5] = sites[5] + new Position(0, 1e-7, 0); break;
        }
        var changed = SiteLandscape.Create(potential, sites, centre, Confinement.Sphere(Length.FromAngstroms(size)));
        Assert.Equal(original.Description, changed.Description);
        var checkpoint = FirstCheckpoint(original);
        var ex = Assert.Throws<CheckpointException>(() => SiteSampler.Resume(changed, ArgonMass, ThirtyOnly, ShortDirect, checkpoint));
        Assert.Contains("in its potential, window, sites or confinement", ex.Message);
        Assert.Single(SiteSampler.Resume(original, ArgonMass, ThirtyOnly, ShortDirect, checkpoint));
    }

    [Fact]
    public void The_landscape_fingerprint_sees_the_confinement_shape()
    {
        // A sphere and a box of the same size share every fingerprint energy (the grid ignores the walls); the shape
        // itself must tell them apart, whatever the description says.
        var box = Cage(Position.Origin, Confinement.Box(Length.FromAngstroms(1.2)));
        var checkpoint = FirstCheckpoint(PlainCage);
        var ex = Assert.Throws<CheckpointException>(() => SiteSampler.Resume(box, ArgonMass, ThirtyOnly, ShortDirect, checkpoint));
        Assert.Contains("in its potential, window, sites or confinement", ex.Message);
    }

    /// <summary>Correlated, offset 3D points (invented).</summary>
    private static (double X, double Y, double Z)[] Points(int count, ulong seed)
    {
        var random = RandomStream.FromSeed(seed);
        var points = new (double, double, double)[count];
        for (int i = 0; i < count; i++)
        {
            double x = 2 + random.NextStandardNormal(), y = -1 + 0.5 * x + random.NextStandardNormal(), z = 3 + 0.2 * y - 0.3 * x + 0.1 * random.NextStandardNormal();
            points[i] = (x, y, z);
        }
        return points;
    }

    private static CovarianceAccumulator Accumulate(IEnumerable<(double X, double Y, double Z)> points)
    {
        var acc = new CovarianceAccumulator();
        foreach (var (x, y, z) in points)
        {
            acc.Add(x, y, z);
        }
        return acc;
    }

    private static void AssertSame(in CovarianceAccumulator expected, in CovarianceAccumulator actual, double tolerance)
    {
        Assert.Equal(expected.Count, actual.Count);
        double[] e = [expected.MeanX, expected.MeanY, expected.MeanZ, expected.Cxx, expected.Cyy, expected.Czz, expected.Cxy, expected.Cxz, expected.Cyz];
        double[] a = [actual.MeanX, actual.MeanY, actual.MeanZ, actual.Cxx, actual.Cyy, actual.Czz, actual.Cxy, actual.Cxz, actual.Cyz];
        for (int i = 0; i < e.Length; i++)
        {
            Assert.True(Math.Abs(e[i] - a[i]) <= tolerance * (1 + Math.Abs(e[i])), $"field {i}: {e[i]} against {a[i]}");
        }
    }

    [Fact]
    public void The_covariance_accumulator_matches_a_two_pass_computation_in_every_element()
    {
        // Two-pass mean and co-moments (common practice, no source) of 1000 correlated points, offset from the origin.
        var points = Points(1000, 5);
        var acc = Accumulate(points);
        double mx = points.Average(p => p.X), my = points.Average(p => p.Y), mz = points.Average(p => p.Z);
        double S(Func<(double X, double Y, double Z), double> f) => points.Sum(f);
        var expected = new CovarianceAccumulator
        {
            Count = 1000, MeanX = mx, MeanY = my, MeanZ = mz,
            Cxx = S(p => (p.X - mx) * (p.X - mx)), Cyy = S(p => (p.Y - my) * (p.Y - my)), Czz = S(p => (p.Z - mz) * (p.Z - mz)),
            Cxy = S(p => (p.X - mx) * (p.Y - my)), Cxz = S(p => (p.X - mx) * (p.Z - mz)), Cyz = S(p => (p.Y - my) * (p.Z - mz)),
        };
        AssertSame(expected, acc, 1e-10);
        var cov = acc.Covariance();
        Assert.Equal(expected.Cxx / 999, cov.XX, 1e-12);
        Assert.Equal(expected.Cyy / 999, cov.YY, 1e-12);
        Assert.Equal(expected.Czz / 999, cov.ZZ, 1e-12);
        Assert.Equal(expected.Cxy / 999, cov.XY, 1e-12);
        Assert.Equal(expected.Cxz / 999, cov.XZ, 1e-12);
        Assert.Equal(expected.Cyz / 999, cov.YZ, 1e-12);

        // One point: a zero covariance, not a division by zero.
        var one = Accumulate(points.Take(1));
        Assert.Equal(new SymmetricTensor(0, 0, 0, 0, 0, 0), one.Covariance());
        Assert.Equal(points[0].X, one.MeanX);
    }

    [Fact]
    public void Merged_covariance_accumulators_equal_a_single_pass_in_every_element()
    {
        var points = Points(1000, 9);
        var whole = Accumulate(points);
        foreach (int cut in new[] { 1, 377, 999 })
        {
            AssertSame(whole, CovarianceAccumulator.Merge(Accumulate(points.Take(cut)), Accumulate(points.Skip(cut))), 1e-10);
        }
        var empty = new CovarianceAccumulator();
        AssertSame(whole, CovarianceAccumulator.Merge(empty, whole), 0);
        AssertSame(whole, CovarianceAccumulator.Merge(whole, empty), 0);
        var none = CovarianceAccumulator.Merge(empty, empty);
        Assert.Equal(0, none.Count);
        Assert.False(double.IsNaN(none.MeanX) || double.IsNaN(none.Cxx), "two empty accumulators merge to an empty one, not NaN");
    }

    [Fact]
    public void Covariance_blocks_from_raw_sums_about_a_reference_equal_the_streaming_accumulator()
    {
        // The vector chains sum deviations from the minimum; FromRawSums must turn those sums into the same block.
        var points = Points(500, 13);
        (double X, double Y, double Z) r = (1.9, -0.8, 3.1);
        double sx = 0, sy = 0, sz = 0, sxx = 0, syy = 0, szz = 0, sxy = 0, sxz = 0, syz = 0;
        foreach (var (x, y, z) in points)
        {
            double dx = x - r.X, dy = y - r.Y, dz = z - r.Z;
            sx += dx; sy += dy; sz += dz;
            sxx += dx * dx; syy += dy * dy; szz += dz * dz;
            sxy += dx * dy; sxz += dx * dz; syz += dy * dz;
        }
        var block = CovarianceAccumulator.FromRawSums(points.Length, r.X, r.Y, r.Z, sx, sy, sz, sxx, syy, szz, sxy, sxz, syz);
        AssertSame(Accumulate(points), block, 1e-9);
        // Rounding can make Σd² − (Σd)²/n a hair negative for a constant coordinate: the diagonal is clamped at zero.
        var flat = CovarianceAccumulator.FromRawSums(3, 0, 0, 0, 0.3, 0.3, 0.3, 0.03 - 1e-17, 0.03 - 1e-17, 0.03 - 1e-17, 0.03, 0.03, 0.03);
        Assert.Equal(0, flat.Cxx);
        Assert.Equal(0, flat.Cyy);
        Assert.Equal(0, flat.Czz);
    }

    [Fact]
    public void A_covariance_accumulator_survives_a_checkpoint_round_trip_bit_for_bit()
    {
        var acc = Accumulate(Points(321, 17));
        var writer = new StateWriter();
        acc.Save(writer);
        var reader = new StateReader(writer.ToArray(), "test accumulator");
        var loaded = CovarianceAccumulator.Load(reader);
        reader.End();
        AssertSame(acc, loaded, 0);
    }

    [Fact]
    public void The_log_weight_is_minus_beta_times_the_energy_inside_and_minus_infinity_outside()
    {
        // Invented: the fcc(111) hollow's sites, which have no centre of symmetry (a mirrored site would give another
        // energy), confined in 0.5 Å around a centre off the start in all three directions.
        var g = LatticeSites.Surface(LatticeKind.FaceCentredCubic, new MillerIndices(1, 1, 1), AdsorptionSiteKind.FccHollow, Length.FromAngstroms(3.8));
        var c = g.Start + new Position(0.05, -0.04, 0.03);
        var landscape = SiteLandscape.Create(Lj, g.Sites, c, Confinement.Sphere(Length.FromAngstroms(0.5)));
        double beta = 1 / Thirty.ThermalEnergyInElectronVolts;
        var weight = new SiteWeight<LennardJones>(landscape, beta);
        foreach (var d in new[] { new Position(0, 0, 0), new Position(0.3, -0.2, 0.1), new Position(0.49, 0, 0), new Position(0, 0, -0.49) })
        {
            var p = c + d;
            Assert.Equal(-beta * landscape.Energy(p), weight.LogWeight(p.X, p.Y, p.Z), 1e-12 * Math.Abs(beta * landscape.Energy(p)));
        }
        // Just outside the wall, along each axis on both sides of the off-start centre.
        foreach (var d in new[] { new Position(0.5001, 0, 0), new Position(-0.5001, 0, 0), new Position(0, 0.5001, 0), new Position(0, -0.5001, 0),
            new Position(0, 0, 0.5001), new Position(0, 0, -0.5001) })
        {
            var p = c + d;
            Assert.Equal(double.NegativeInfinity, weight.LogWeight(p.X, p.Y, p.Z));
        }
    }

    [Fact]
    public void The_log_weight_refuses_a_nan_or_minus_infinite_energy_and_names_the_potential()
    {
        // Invented: a Buckingham pair (A = 1000 eV, ρ = 0.3 Å, C = 20 eV·Å⁶) falls to −∞ on top of a site, and its sum
        // with Lennard-Jones is ∞ − ∞ = NaN there. The confinement (4 Å) takes in the cage's sites, so both can be reached.
        var buckingham = new Buckingham(Energy.FromElectronVolts(1000), Length.FromAngstroms(0.3), 20);
        var site = CageSites()[0];
        var wide = Confinement.Sphere(Length.FromAngstroms(4));
        var falling = new SiteWeight<Buckingham>(SiteLandscape.Create(buckingham, CageSites(), Position.Origin, wide), 1);
        Assert.True(double.IsFinite(falling.LogWeight(0, 0, 0)));
        var minusInfinity = Assert.Throws<NonFiniteEnergyException>(() => falling.LogWeight(site.X, site.Y, site.Z));
        Assert.Equal(double.NegativeInfinity, minusInfinity.ReturnedEnergy);
        Assert.Equal(0, minusInfinity.Separation); // the failing pair's separation, not the position's distance from the origin
        Assert.Contains(buckingham.Description, minusInfinity.Message);
        var sum = new SumPotential<LennardJones, Buckingham>(Lj, buckingham);
        var undefined = new SiteWeight<SumPotential<LennardJones, Buckingham>>(SiteLandscape.Create(sum, CageSites(), Position.Origin, wide), 1);
        var nan = Assert.Throws<NonFiniteEnergyException>(() => undefined.LogWeight(site.X, site.Y, site.Z));
        Assert.True(double.IsNaN(nan.ReturnedEnergy));
        Assert.Equal(0, nan.Separation);
        // A plain +∞ (Lennard-Jones on top of a site) is a zero weight, not an error.
        var lj = new SiteWeight<LennardJones>(SiteLandscape.Create(Lj, CageSites(), Position.Origin, wide), 1);
        Assert.Equal(double.NegativeInfinity, lj.LogWeight(site.X, site.Y, site.Z));
    }
}
