using System;
using System.Collections.Immutable;
using System.Globalization;
using System.Linq;
using System.Threading;
using ThermalSampling.Analysis;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Reports;
using ThermalSampling.Sampling;
using ThermalSampling.Units;

namespace ThermalSampling;

/// <summary>
/// Quantum thermal distributions by path-integral Monte Carlo: each chain is a ring polymer of P beads (the primitive
/// factorisation; the walk is described in docs/quantum.md), run at P and at P/2 beads and extrapolated to P → ∞, beside a
/// classical run at the same settings and the exact quantum values (grid for pairs, oscillator basis for sites).
/// </summary>
/// <remarks>
/// The runs at P and P/2 use the seeds Seed + P·0x9E3779B97F4A7C15 and Seed + (P/2)·0x9E3779B97F4A7C15 (wrapping), so they
/// are independent of each other and of the classical run (which uses Seed); every result is reproducible from the seed,
/// at any thread count and lane width. Metropolis only: <see cref="SamplingSettings.Method"/> must be Metropolis.
/// </remarks>
public static class PathIntegralSampler
{
    /// <summary>The most beads a ring may have.</summary>
    public const int MaxBeads = 4096;

    /// <summary>The fewest beads of a default ring.</summary>
    public const int MinDefaultBeads = 8;

    /// <summary>A result counts as converged in P when the extrapolation moves the run at P by at most this share of the value (plus two standard errors of the move).</summary>
    public const double ConvergenceTolerance = 0.05;

    /// <summary>A warning whose code contains "quantum" is raised when the quantum and classical spreads differ by more than this share.</summary>
    public const double QuantumClassicalDifferenceToWarn = 0.10;

    /// <summary>
    /// The default number of beads: the power of two at or above max(8, 2·ħω_max/kT). For a harmonic well the run at P is
    /// then within 2.7 % of the quantum variance and the extrapolation from P/2 and P within 0.4 % for ħω/kT up to 100
    /// (the closed form in docs/quantum.md); at most <see cref="MaxBeads"/>.
    /// </summary>
    /// <param name="largestQuantumToThermalRatio">The largest ħω/kT over the modes; finite and at least 0.</param>
    public static int DefaultBeads(double largestQuantumToThermalRatio)
    {
        Internal.Preconditions.CheckNonNegative(largestQuantumToThermalRatio, nameof(largestQuantumToThermalRatio));
        double want = Math.Max(MinDefaultBeads, 2 * largestQuantumToThermalRatio);
        int p = MinDefaultBeads;
        while (p < want && p < MaxBeads)
        {
            p *= 2;
        }
        return p;
    }

    /// <summary>
    /// The staging length L for P beads: the largest power of two, at least 2 and at most P, whose segment spans an imaginary
    /// time Lβħ/P of at most 2/ω_max (over which the free-particle bridge is still close to the bridge in the well, so a
    /// segment's regrowth is accepted often). Our rule, tuned on harmonic wells; no source.
    /// </summary>
    /// <param name="beads">P, a power of two from 2 to <see cref="MaxBeads"/>.</param>
    /// <param name="largestQuantumToThermalRatio">The largest ħω/kT (NaN when unknown: then L = min(P, 8)).</param>
    public static int StagingLinks(int beads, double largestQuantumToThermalRatio)
    {
        CheckBeads(beads, nameof(beads));
        if (double.IsNaN(largestQuantumToThermalRatio))
        {
            return Math.Min(beads, 8);
        }
        int l = 2;
        while (l * 2 <= beads && l * 2 * largestQuantumToThermalRatio <= 2.0 * beads)
        {
            l *= 2;
        }
        return Math.Min(l, beads);
    }

    /// <summary>Samples the quantum distribution of a line or radial pair's separation at one temperature.</summary>
    /// <typeparam name="TPotential">The potential type.</typeparam>
    /// <param name="landscape">The landscape (a radial pair is sampled as its relative vector in three dimensions).</param>
    /// <param name="mass">The mass of the moving particle (the reduced mass for a pair of two moving atoms).</param>
    /// <param name="temperature">The temperature.</param>
    /// <param name="settings">The sampling settings (Metropolis); each run (classical, P, P/2) uses them whole.</param>
    /// <param name="beads">P, a power of two from 2 to <see cref="MaxBeads"/>; null for <see cref="DefaultBeads"/>.</param>
    /// <param name="progress">Optional progress sink (the three runs report in turn).</param>
    /// <param name="cancellationToken">Optional cancellation.</param>
    public static PairPathIntegralReport RunPair<TPotential>(PairLandscape<TPotential> landscape, Mass mass, Temperature temperature, SamplingSettings settings,
        int? beads = null, IProgress<SamplingProgress>? progress = null, CancellationToken cancellationToken = default)
        where TPotential : struct, IPairPotential
    {
        RunArguments.Check(landscape, settings, mass, temperature);
        RunArguments.CheckOneTemperature(settings);
        CheckMethod(settings);
        var references = PairSummary.Analyse(landscape, mass, temperature);
        double ratio = references.Harmonic?.QuantumToThermalRatio ?? double.NaN;
        int p = ChooseBeads(beads, ratio);
        var classical = PairSampler.Run(landscape, mass, temperature, settings, progress, cancellationToken);
        double target = settings.TargetAcceptance ?? PairSampler.DefaultTargetAcceptance;
        double width0 = Math.Min(settings.InitialStepWidthInAngstroms ?? references.Harmonic?.ClassicalRmsInAngstroms ?? landscape.WindowWidthInAngstroms / 10,
            landscape.WindowWidthInAngstroms);
        double reference = references.Well?.EquilibriumDistanceInAngstroms ?? references.Exact.MeanInAngstroms;
        double hbar2m = PhysicalConstants.HbarSquaredOverAtomicMassElectronVoltAngstromSquared / mass.InAtomicMassUnits;
        (PairVibrationReport, Estimate) RunAt(int n)
        {
            var s = settings with { Seed = SeedFor(settings.Seed, n) };
            var record = PairChains.Sample(landscape, references.Exact, reference, width0, target, temperature, s, progress, cancellationToken, null, 0,
                ChainRange.All(s.Chains), new RingPlan(n, StagingLinks(n, ratio), hbar2m));
            return (PairSummary.Summarise(landscape, mass, temperature, s, references, record, pathIntegral: true), Kinetic(record));
        }
        var (full, fullKinetic) = RunAt(p);
        var (half, halfKinetic) = RunAt(p / 2);
        var exact = classical.QuantumExact ?? QuantumPairDistribution.Compute(landscape, mass, temperature);

        var mean = Extrapolate(full.Mean, half.Mean);
        var variance = Extrapolate(full.Variance, half.Variance);
        double rms = Math.Sqrt(Math.Max(variance.Value, 0));
        var (converged, correction) = Convergence(full.Variance, half.Variance, variance);
        double zeroPoint = references.Harmonic?.ZeroPointVarianceInAngstromsSquared ?? double.NaN;
        var details = new PathIntegralDetails(p, StagingLinks(p, ratio), true, converged, correction, ratio,
            ClassicalValidity.DeBroglieWavelengthInAngstroms(mass, temperature), zeroPoint);
        var z = (mean.ZScore(exact.MeanInAngstroms), variance.ZScore(exact.VarianceInAngstromsSquared));

        var warnings = ImmutableArray.CreateBuilder<Warning>();
        AddVerdict(warnings, "RMS spread", rms, classical.Rms.Value, "Å", details);
        if (Math.Abs(z.Item1) > 4 || Math.Abs(z.Item2) > 4)
        {
            warnings.Add(new Warning(WarningCodes.DisagreesWithExact, string.Create(CultureInfo.InvariantCulture,
                $"The path-integral mean or variance differs from the exact quantum (grid) value by more than 4 standard errors (z = {z.Item1:G3}, {z.Item2:G3}): raise the beads or the samples. Trust the exact value ({exact.MeanInAngstroms:G6} Å, {exact.VarianceInAngstromsSquared:G4} Å²).")));
        }
        warnings.AddRange(full.Warnings.Where(w => w.Code != WarningCodes.QuantumEffects));
        return new PairPathIntegralReport
        {
            Temperature = temperature,
            Mean = mean,
            MeanShift = references.Well is null ? null : new Estimate(mean.Value - references.Well.EquilibriumDistanceInAngstroms, mean.StandardError),
            Variance = variance,
            Rms = new Estimate(rms, rms > 0 ? variance.StandardError / (2 * rms) : 0),
            PathIntegral = details,
            Exact = exact,
            ZScoresAgainstExact = z,
            Classical = classical,
            AtBeads = full,
            AtHalfBeads = half,
            KineticEnergy = Extrapolate(fullKinetic, halfKinetic),
            ClassicalKineticEnergyInElectronVolts = (landscape.Geometry == SeparationGeometry.Radial ? 1.5 : 0.5) * temperature.ThermalEnergyInElectronVolts,
            Warnings = warnings.ToImmutable(),
        };
    }

    /// <summary>
    /// The mean centroid-virial kinetic energy over every chain's values, eV, with the standard error from the spread of the
    /// chains' own means (the chains are independent); NaN error with a single chain.
    /// </summary>
    private static Estimate Kinetic(TemperatureRecord record)
    {
        var chains = record.Chains.Where(c => c.Kinetic.Count > 0).ToList();
        double total = chains.Sum(c => (double)c.Kinetic.Count);
        double mean = chains.Sum(c => c.Kinetic.Sum) / total;
        if (chains.Count < 2)
        {
            return new Estimate(mean, double.NaN);
        }
        var means = chains.Select(c => c.Kinetic.Sum / c.Kinetic.Count).ToList();
        double average = means.Average();
        double spread = means.Sum(m => (m - average) * (m - average)) / (means.Count - 1);
        return new Estimate(mean, Math.Sqrt(spread / means.Count));
    }

    /// <summary>Samples the quantum distribution of a particle at a site at one temperature.</summary>
    /// <typeparam name="TPotential">The potential type.</typeparam>
    /// <param name="landscape">The landscape.</param>
    /// <param name="mass">The particle's mass.</param>
    /// <param name="temperature">The temperature.</param>
    /// <param name="settings">The sampling settings (Metropolis); each run (classical, P, P/2) uses them whole.</param>
    /// <param name="beads">P, a power of two from 2 to <see cref="MaxBeads"/>; null for <see cref="DefaultBeads"/>.</param>
    /// <param name="progress">Optional progress sink.</param>
    /// <param name="cancellationToken">Optional cancellation.</param>
    public static SitePathIntegralReport RunSite<TPotential>(SiteLandscape<TPotential> landscape, Mass mass, Temperature temperature, SamplingSettings settings,
        int? beads = null, IProgress<SamplingProgress>? progress = null, CancellationToken cancellationToken = default)
        where TPotential : struct, IPairPotential
    {
        RunArguments.Check(landscape, settings, mass, temperature);
        RunArguments.CheckOneTemperature(settings);
        CheckMethod(settings);
        var harmonic = SiteAnalysis.Harmonic(landscape, mass, temperature);
        double ratio = harmonic.Modes.Max(m => m.QuantumToThermalRatio);
        int p = ChooseBeads(beads, ratio);
        var classical = SiteSampler.Run(landscape, mass, temperature, settings, progress, cancellationToken);
        double target = settings.TargetAcceptance ?? SiteSampler.DefaultTargetAcceptance;
        double hbar2m = PhysicalConstants.HbarSquaredOverAtomicMassElectronVoltAngstromSquared / mass.InAtomicMassUnits;
        (SiteVibrationReport, Estimate) RunAt(int n)
        {
            var s = settings with { Seed = SeedFor(settings.Seed, n) };
            var record = SiteChains.Sample(landscape, harmonic, target, temperature, s, progress, cancellationToken, null, 0, ChainRange.All(s.Chains),
                new RingPlan(n, StagingLinks(n, ratio), hbar2m));
            return (SiteSummary.Summarise(landscape, mass, temperature, s, harmonic, record, pathIntegral: true), Kinetic(record));
        }
        var (full, fullKinetic) = RunAt(p);
        var (half, halfKinetic) = RunAt(p / 2);
        QuantumSite? exact = classical.QuantumExact;
        string? why = null;
        if (exact is null)
        {
            exact = QuantumSite.Compute(landscape, mass, temperature, out why);
        }

        var msd = Extrapolate(full.MeanSquareDisplacement, half.MeanSquareDisplacement);
        var (converged, correction) = Convergence(full.MeanSquareDisplacement, half.MeanSquareDisplacement, msd);
        var mean = new Position(Richardson(full.Mean.X, half.Mean.X), Richardson(full.Mean.Y, half.Mean.Y), Richardson(full.Mean.Z, half.Mean.Z));
        var meanSe = new Position(Combined(full.MeanStandardError.X, half.MeanStandardError.X), Combined(full.MeanStandardError.Y, half.MeanStandardError.Y),
            Combined(full.MeanStandardError.Z, half.MeanStandardError.Z));
        SymmetricTensor a = full.Covariance, b = half.Covariance;
        var covariance = new SymmetricTensor(Richardson(a.XX, b.XX), Richardson(a.YY, b.YY), Richardson(a.ZZ, b.ZZ), Richardson(a.XY, b.XY),
            Richardson(a.XZ, b.XZ), Richardson(a.YZ, b.YZ));
        double zeroPoint = harmonic.Modes.Sum(m => m.QuantumVarianceInAngstromsSquared / Coth(m.QuantumToThermalRatio / 2));
        var details = new PathIntegralDetails(p, StagingLinks(p, ratio), true, converged, correction, ratio,
            ClassicalValidity.DeBroglieWavelengthInAngstroms(mass, temperature), zeroPoint);
        double bFactor = 8 * Math.PI * Math.PI / 3;

        var warnings = ImmutableArray.CreateBuilder<Warning>();
        AddVerdict(warnings, "mean-square displacement", msd.Value, classical.MeanSquareDisplacement.Value, "Å²", details);
        if (exact is null)
        {
            warnings.Add(new Warning(WarningCodes.QuantumEffects, $"No exact quantum reference for this site at this temperature: {why}."));
        }
        else if (Math.Abs(msd.ZScore(exact.MeanSquareDisplacementInAngstromsSquared)) > 4)
        {
            warnings.Add(new Warning(WarningCodes.DisagreesWithExact, string.Create(CultureInfo.InvariantCulture,
                $"The path-integral mean-square displacement differs from the exact quantum (basis) value {exact.MeanSquareDisplacementInAngstromsSquared:G4} Å² by more than 4 standard errors (z = {msd.ZScore(exact.MeanSquareDisplacementInAngstromsSquared):G3}): raise the beads or the samples.")));
        }
        warnings.AddRange(full.Warnings.Where(w => w.Code != WarningCodes.QuantumEffects));
        return new SitePathIntegralReport
        {
            Temperature = temperature,
            Mean = mean,
            MeanStandardError = meanSe,
            MeanShift = mean - harmonic.Minimum,
            Covariance = covariance,
            MeanSquareDisplacement = msd,
            DebyeWallerB = new Estimate(bFactor * msd.Value, bFactor * msd.StandardError),
            PathIntegral = details,
            Exact = exact,
            ExactUnavailableReason = why,
            Classical = classical,
            AtBeads = full,
            AtHalfBeads = half,
            KineticEnergy = Extrapolate(fullKinetic, halfKinetic),
            ClassicalKineticEnergyInElectronVolts = 1.5 * temperature.ThermalEnergyInElectronVolts,
            Warnings = warnings.ToImmutable(),
        };
    }

    private static double Coth(double x) => 1 / Math.Tanh(x);

    /// <summary>The seed of the run at <paramref name="beads"/> beads.</summary>
    internal static ulong SeedFor(ulong seed, int beads) => unchecked(seed + (ulong)beads * 0x9E3779B97F4A7C15UL);

    private static void CheckMethod(SamplingSettings settings)
    {
        if (settings.Method != SamplingMethod.Metropolis)
        {
            throw new ArgumentException($"settings.Method is {settings.Method}; path-integral sampling walks ring polymers and needs Metropolis.", nameof(settings));
        }
    }

    private static void CheckBeads(int beads, string name)
    {
        if (beads < 2 || beads > MaxBeads || (beads & (beads - 1)) != 0)
        {
            throw new ArgumentOutOfRangeException(name, beads, $"{name} is {beads}; it must be a power of two from 2 to {MaxBeads}.");
        }
    }

    private static int ChooseBeads(int? beads, double ratio)
    {
        if (beads is int given)
        {
            CheckBeads(given, "beads");
            return given;
        }
        return double.IsNaN(ratio) ? 64 : DefaultBeads(ratio);
    }

    /// <summary>Richardson's step for an error even in 1/P: (4v_P − v_{P/2})/3.</summary>
    private static double Richardson(double atP, double atHalf) => (4 * atP - atHalf) / 3;

    /// <summary>The standard error of <see cref="Richardson"/> from independent runs: √(16σ_P² + σ_{P/2}²)/3.</summary>
    private static double Combined(double atP, double atHalf) => Math.Sqrt(16 * atP * atP + atHalf * atHalf) / 3;

    private static Estimate Extrapolate(Estimate atP, Estimate atHalf)
        => new(Richardson(atP.Value, atHalf.Value), Combined(atP.StandardError, atHalf.StandardError));

    /// <summary>Whether the extrapolation's move of the run at P is within tolerance, and that move relative to the extrapolated value.</summary>
    private static (bool Converged, double Correction) Convergence(Estimate atP, Estimate atHalf, Estimate extrapolated)
    {
        double move = extrapolated.Value - atP.Value; // (v_P − v_{P/2})/3
        double moveSe = Math.Sqrt(atP.StandardError * atP.StandardError + atHalf.StandardError * atHalf.StandardError) / 3;
        bool converged = Math.Abs(move) <= ConvergenceTolerance * Math.Abs(extrapolated.Value) + 2 * moveSe;
        return (converged, extrapolated.Value != 0 ? move / extrapolated.Value : 0);
    }

    /// <summary>The quantum verdict: how far classical statistics are off, with the quantum number, and a warning when P is not enough.</summary>
    private static void AddVerdict(ImmutableArray<Warning>.Builder warnings, string what, double quantum, double classical, string unit, PathIntegralDetails details)
    {
        var c = CultureInfo.InvariantCulture;
        double ratio = quantum / classical;
        if (Math.Abs(ratio - 1) > QuantumClassicalDifferenceToWarn)
        {
            warnings.Add(new Warning(WarningCodes.QuantumEffects, string.Format(c,
                "Classical statistics {0} the {1} by {2:P0} here: the path-integral (quantum) value is {3:G4} {4}, against {5:G4} {4} classically (ħω/kT = {6:G3}, {7} beads extrapolated). The values reported are the quantum ones.",
                ratio >= 1 ? "underestimate" : "overestimate", what, Math.Abs(ratio - 1), quantum, unit, classical, details.LargestQuantumToThermalRatio, details.Beads)));
        }
        if (!details.Converged)
        {
            warnings.Add(new Warning(WarningCodes.QuantumBeadsNotConverged, string.Format(c,
                "The {0} still changes with the number of beads: extrapolating from {1} and {2} beads moved it by {3:P1}, more than the {4:P0} tolerance; run with more beads.",
                what, details.Beads / 2, details.Beads, Math.Abs(details.RelativeBeadCorrection), ConvergenceTolerance)));
        }
    }
}
