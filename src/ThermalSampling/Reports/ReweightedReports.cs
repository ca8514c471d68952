using ThermalSampling.Analysis;
using ThermalSampling.Landscapes;
using ThermalSampling.Units;

namespace ThermalSampling.Reports;

/// <summary>Where a reweighted estimate comes from: the two sampled temperatures that bracket it and their energy histograms' overlap.</summary>
/// <param name="LowerKelvin">The sampled temperature below (or equal to) the target, K.</param>
/// <param name="UpperKelvin">The sampled temperature above (or equal to) the target, K.</param>
/// <param name="Overlap">Σ_b min(p_lower, p_upper) over their common energy bins (1 when the target was sampled itself).</param>
/// <param name="ShareLeftOut">The share of the two runs' counted draws below V_ref or beyond the fine energy bins (left out of the reweighting).</param>
public sealed record ReweightingSource(double LowerKelvin, double UpperKelvin, double Overlap, double ShareLeftOut);

/// <summary>A pair's observables at a temperature that was not sampled, reweighted from the sampled ones, with jackknife standard errors over chains.</summary>
public sealed record ReweightedPairEstimate
{
    /// <summary>The target temperature.</summary>
    public required Temperature Temperature { get; init; }

    /// <summary>⟨r⟩, Å.</summary>
    public required Estimate Mean { get; init; }

    /// <summary>⟨r⟩ − minimum, Å (absent without a minimum in the window).</summary>
    public required Estimate? MeanShift { get; init; }

    /// <summary>The variance of r, Å².</summary>
    public required Estimate Variance { get; init; }

    /// <summary>The RMS spread, Å.</summary>
    public required Estimate Rms { get; init; }

    /// <summary>⟨V⟩ − V_ref, eV (V_ref the records' reference energy), from the bins' centres.</summary>
    public required Estimate PotentialEnergy { get; init; }

    /// <summary>The exact classical distribution at the target (quadrature), to compare with.</summary>
    public required ExactPairDistribution Exact { get; init; }

    /// <summary>The runs it comes from.</summary>
    public required ReweightingSource Source { get; init; }
}

/// <summary>A site's observables at a temperature that was not sampled, reweighted from the sampled ones, with jackknife standard errors over chains.</summary>
public sealed record ReweightedSiteEstimate
{
    /// <summary>The target temperature.</summary>
    public required Temperature Temperature { get; init; }

    /// <summary>The mean position, Å.</summary>
    public required Position Mean { get; init; }

    /// <summary>Standard errors of the mean's components, Å.</summary>
    public required Position MeanStandardError { get; init; }

    /// <summary>The displacement covariance about the mean, Å².</summary>
    public required SymmetricTensor Covariance { get; init; }

    /// <summary>tr(covariance), Å².</summary>
    public required Estimate MeanSquareDisplacement { get; init; }

    /// <summary>B = 8π²·MSD/3, Å².</summary>
    public required Estimate DebyeWallerB { get; init; }

    /// <summary>⟨V⟩ − V_min, eV, from the bins' centres.</summary>
    public required Estimate PotentialEnergy { get; init; }

    /// <summary>The runs it comes from.</summary>
    public required ReweightingSource Source { get; init; }
}
