using System.Collections.Immutable;
using ThermalSampling.Analysis;
using ThermalSampling.Landscapes;
using ThermalSampling.Units;

namespace ThermalSampling.Reports;

/// <summary>How a path-integral result was obtained, and how far its number of beads can be trusted.</summary>
/// <param name="Beads">P, the ring polymer's beads in the main run (a power of two).</param>
/// <param name="StagingLinks">L, the links of each staging segment redrawn from the free-particle bridge.</param>
/// <param name="Extrapolated">Whether the main values are extrapolated to P → ∞ from the runs at P and P/2 (Richardson: (4v_P − v_{P/2})/3, the primitive factorisation's error being even in 1/P); always true today.</param>
/// <param name="Converged">Whether the extrapolation's correction to the run at P is at most <see cref="PathIntegralSampler.ConvergenceTolerance"/> of the value (plus two of its standard errors); when false, raise P.</param>
/// <param name="RelativeBeadCorrection">(v_∞ − v_P)/v_∞ for the variance (pairs) or the mean-square displacement (sites): how much the extrapolation moved the run at P.</param>
/// <param name="LargestQuantumToThermalRatio">The largest ħω/kT over the harmonic modes (NaN when there is no minimum), from which the default P is chosen.</param>
/// <param name="ThermalWavelengthInAngstroms">Λ = h/√(2π m kT), Å.</param>
/// <param name="ZeroPointVarianceInAngstromsSquared">The harmonic zero-point spread: ħ/(2mω) for a pair, Σ_modes ħ/(2mω) (the T → 0 mean-square displacement) for a site, Å²; NaN without a minimum.</param>
public sealed record PathIntegralDetails(int Beads, int StagingLinks, bool Extrapolated, bool Converged, double RelativeBeadCorrection,
    double LargestQuantumToThermalRatio, double ThermalWavelengthInAngstroms, double ZeroPointVarianceInAngstromsSquared);

/// <summary>
/// The quantum thermal distribution of a pair's separation from path-integral sampling, beside the exact quantum values
/// (grid) and the classical ones. The main values are extrapolated in the number of beads; the full reports of the runs at
/// P and P/2 and of the classical run are kept.
/// </summary>
public sealed record PairPathIntegralReport
{
    /// <summary>The temperature.</summary>
    public required Temperature Temperature { get; init; }

    /// <summary>Quantum ⟨r⟩, Å.</summary>
    public required Estimate Mean { get; init; }

    /// <summary>Quantum ⟨r⟩ − minimum, Å (absent without a minimum inside the window).</summary>
    public required Estimate? MeanShift { get; init; }

    /// <summary>Quantum variance of the separation, Å².</summary>
    public required Estimate Variance { get; init; }

    /// <summary>Quantum RMS spread, Å.</summary>
    public required Estimate Rms { get; init; }

    /// <summary>Beads, staging, convergence in P, ħω/kT, Λ and the zero-point variance.</summary>
    public required PathIntegralDetails PathIntegral { get; init; }

    /// <summary>The exact quantum distribution on the same window (grid), against which the sampled values are checked.</summary>
    public required QuantumPairDistribution Exact { get; init; }

    /// <summary>(sampled − exact)/standard error of the quantum mean and variance.</summary>
    public required (double Mean, double Variance) ZScoresAgainstExact { get; init; }

    /// <summary>The classical run at the same settings (its report, with the classical quadrature and harmonic estimates).</summary>
    public required PairVibrationReport Classical { get; init; }

    /// <summary>The path-integral run at P beads (its histogram, cumulants and diagnostics describe the bead distribution at this P).</summary>
    public required PairVibrationReport AtBeads { get; init; }

    /// <summary>The run at P/2 beads, used for the extrapolation.</summary>
    public required PairVibrationReport AtHalfBeads { get; init; }

    /// <summary>
    /// The kinetic energy from the centroid-virial estimator (every 16th step of each ring), extrapolated in P like the
    /// other values, eV, with the standard error from the spread of the chains' means; the zero-point motion raises it
    /// above the classical <see cref="ClassicalKineticEnergyInElectronVolts"/>.
    /// </summary>
    public required Estimate KineticEnergy { get; init; }

    /// <summary>The classical kinetic energy, d·kT/2 (d = 1 on a line, 3 for a radial pair's relative vector and for a site), eV.</summary>
    public required double ClassicalKineticEnergyInElectronVolts { get; init; }

    /// <summary>The verdict on classical statistics and on the quantum result (codes in <see cref="WarningCodes"/>).</summary>
    public required ImmutableArray<Warning> Warnings { get; init; }

    /// <summary>
    /// The report in the form of a classical one, for code that reads vibration reports (tables, figures, JSON): the run at
    /// P beads (its histogram is the quantum density at P) with the extrapolated mean, shift, variance and RMS, this report's
    /// warnings, the exact quantum values in place of the classical quadrature (<see cref="PairVibrationReport.Exact"/>:
    /// moments, z-scores and the grid's probability in each histogram bin) and <see cref="PairVibrationReport.QuantumExact"/>.
    /// </summary>
    public PairVibrationReport ToVibrationReport()
    {
        var q = Exact;
        double sigma = System.Math.Sqrt(q.VarianceInAngstromsSquared);
        var h = AtBeads.Histogram;
        var bins = new double[h.Density.Length];
        for (int i = 0; i < q.Grid.Length; i++)
        {
            int bin = (int)System.Math.Floor((q.Grid[i] - h.Lower) / h.BinWidth);
            if (bin >= 0 && bin < bins.Length)
            {
                bins[bin] += q.Probabilities[i] / h.BinWidth;
            }
        }
        return AtBeads with
        {
            Mean = Mean,
            MeanShift = MeanShift,
            Variance = Variance,
            Rms = Rms,
            Exact = new ExactComparison(q.MeanInAngstroms, q.VarianceInAngstromsSquared, q.Skewness, q.ExcessKurtosis, double.NaN, ZScoresAgainstExact.Mean,
                ZScoresAgainstExact.Variance, q.Skewness * sigma * sigma * sigma, q.ExcessKurtosis * sigma * sigma * sigma * sigma),
            ExactBinDensity = [.. bins],
            QuantumExact = q,
            Warnings = Warnings,
        };
    }
}

/// <summary>
/// The quantum thermal distribution of a particle at a site from path-integral sampling, beside the exact quantum tensor
/// (oscillator basis, where the temperature allows it) and the classical run. Extrapolated in the number of beads.
/// </summary>
public sealed record SitePathIntegralReport
{
    /// <summary>The temperature.</summary>
    public required Temperature Temperature { get; init; }

    /// <summary>Quantum mean position, Å.</summary>
    public required Position Mean { get; init; }

    /// <summary>Standard errors of the mean's components, Å.</summary>
    public required Position MeanStandardError { get; init; }

    /// <summary>Mean − minimum, Å.</summary>
    public required Position MeanShift { get; init; }

    /// <summary>Quantum displacement covariance about the mean, Å² (each component extrapolated).</summary>
    public required SymmetricTensor Covariance { get; init; }

    /// <summary>Quantum mean-square displacement tr(covariance), Å².</summary>
    public required Estimate MeanSquareDisplacement { get; init; }

    /// <summary>B = 8π²·MSD/3, Å².</summary>
    public required Estimate DebyeWallerB { get; init; }

    /// <summary>Beads, staging, convergence in P, ħω/kT, Λ and the zero-point mean-square displacement.</summary>
    public required PathIntegralDetails PathIntegral { get; init; }

    /// <summary>The exact quantum tensor (oscillator basis), or null when the temperature is too high for it (<see cref="ExactUnavailableReason"/>).</summary>
    public required QuantumSite? Exact { get; init; }

    /// <summary>Why <see cref="Exact"/> is absent, or null.</summary>
    public required string? ExactUnavailableReason { get; init; }

    /// <summary>The classical run at the same settings.</summary>
    public required SiteVibrationReport Classical { get; init; }

    /// <summary>The path-integral run at P beads.</summary>
    public required SiteVibrationReport AtBeads { get; init; }

    /// <summary>The run at P/2 beads, used for the extrapolation.</summary>
    public required SiteVibrationReport AtHalfBeads { get; init; }

    /// <summary>
    /// The kinetic energy from the centroid-virial estimator (every 16th step of each ring), extrapolated in P like the
    /// other values, eV, with the standard error from the spread of the chains' means; the zero-point motion raises it
    /// above the classical <see cref="ClassicalKineticEnergyInElectronVolts"/>.
    /// </summary>
    public required Estimate KineticEnergy { get; init; }

    /// <summary>The classical kinetic energy, d·kT/2 (d = 1 on a line, 3 for a radial pair's relative vector and for a site), eV.</summary>
    public required double ClassicalKineticEnergyInElectronVolts { get; init; }

    /// <summary>The verdict on classical statistics and on the quantum result.</summary>
    public required ImmutableArray<Warning> Warnings { get; init; }

    /// <summary>
    /// The report in the form of a classical one: the run at P beads with the extrapolated mean, shift, covariance, MSD and
    /// B, this report's warnings and the exact quantum tensor as <see cref="SiteVibrationReport.QuantumExact"/>.
    /// </summary>
    public SiteVibrationReport ToVibrationReport() => AtBeads with
    {
        Mean = Mean,
        MeanStandardError = MeanStandardError,
        MeanShift = MeanShift,
        Covariance = Covariance,
        MeanSquareDisplacement = MeanSquareDisplacement,
        DebyeWallerB = DebyeWallerB,
        QuantumExact = Exact,
        Warnings = Warnings,
    };
}
