using System;
using System.Collections.Immutable;
using System.Globalization;
using ThermalSampling.Internal;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Units;

namespace ThermalSampling.Analysis;

/// <summary>The numbers behind the classical-validity verdict, and the warnings they raise.</summary>
/// <param name="DeBroglieWavelengthInAngstroms">Λ = h/√(2π m kB T), the standard thermal de Broglie wavelength, Å.</param>
/// <param name="RmsSpreadInAngstroms">The RMS spread it is compared with (per direction), Å.</param>
/// <param name="QuantumToThermalRatio">The largest ħω/kT over the modes.</param>
/// <param name="QuantumVarianceRatio">Quantum over classical harmonic variance for the stiffest mode, (x/2)coth(x/2) with x = ħω/kT.</param>
/// <param name="ThermalEnergyOverWellDepth">kT divided by the depth of the well (0 when the well is infinitely deep).</param>
/// <param name="ProbabilityNearWalls">The probability within one RMS spread of the walls, where known (see <see cref="ExactPairDistribution.ProbabilityNearWalls"/>), otherwise null.</param>
/// <param name="Warnings">Plain-language warnings for every threshold crossed.</param>
public sealed record ValidityAssessment(double DeBroglieWavelengthInAngstroms, double RmsSpreadInAngstroms, double QuantumToThermalRatio,
    double QuantumVarianceRatio, double ThermalEnergyOverWellDepth, double? ProbabilityNearWalls, ImmutableArray<Warning> Warnings)
{
    /// <summary>Whether no threshold was crossed.</summary>
    public bool IsClassicalPictureTrustworthy => Warnings.IsEmpty;
}

/// <summary>
/// Judges whether classical Boltzmann statistics in this well can be trusted. Thresholds
/// (common practice, no source; documented in docs/validity.md):
/// quantum variance more than 5% above classical (ħω/kT ≳ 0.78); Λ above the RMS spread;
/// kT above 5% of the well depth; more than 1% of the probability within one RMS spread of the walls.
/// </summary>
public static class ClassicalValidity
{
    /// <summary>The quantum-effects warning's closing advice, which a report replaces by the exact quantum number where it computes one.</summary>
    internal const string QuantumAdvice = " Use the quantum harmonic estimate or a path-integral method; light atoms and low temperatures are where this bites.";

    /// <summary>Quantum/classical variance ratio above which <see cref="WarningCodes.QuantumEffects"/> is raised.</summary>
    public const double QuantumVarianceRatioThreshold = 1.05;

    /// <summary>Λ/RMS above which <see cref="WarningCodes.DeBroglieWavelength"/> is raised.</summary>
    public const double DeBroglieToRmsThreshold = 1.0;

    /// <summary>kT/depth above which <see cref="WarningCodes.EscapeRisk"/> is raised.</summary>
    public const double EscapeRiskThreshold = 0.05;

    /// <summary>Probability within one RMS spread of the walls above which <see cref="WarningCodes.WallMass"/> is raised (walls at about 3.5 harmonic spreads, where they change the variance by about 0.5 %).</summary>
    public const double ProbabilityNearWallsThreshold = 0.01;

    /// <summary>The thermal de Broglie wavelength Λ = h/√(2π m kB T), Å (the standard convention).</summary>
    /// <param name="mass">The particle's mass.</param>
    /// <param name="temperature">The temperature.</param>
    public static double DeBroglieWavelengthInAngstroms(Mass mass, Temperature temperature)
    {
        PairAnalysis.CheckArguments(mass, temperature);
        double lambda = PhysicalConstants.PlanckJouleSecond
            / Math.Sqrt(2 * Math.PI * mass.InKilograms * PhysicalConstants.BoltzmannJoulePerKelvin * temperature.InKelvin);
        return lambda * 1e10;
    }

    /// <summary>Assesses one temperature.</summary>
    /// <param name="mass">The particle's mass.</param>
    /// <param name="temperature">The temperature.</param>
    /// <param name="rmsSpreadInAngstroms">The RMS spread per direction (from the exact distribution, sampling or the harmonic estimate), Å.</param>
    /// <param name="largestQuantumToThermalRatio">The largest ħω/kT over the modes.</param>
    /// <param name="wellDepthInElectronVolts">The well depth, eV (+∞ for a harmonic bond).</param>
    /// <param name="probabilityNearWalls">The probability within one RMS spread of the walls (exact for a pair; for a site, the
    /// share of draws within one harmonic RMS spread of the confinement), when known; in [0, 1].</param>
    public static ValidityAssessment Assess(Mass mass, Temperature temperature, double rmsSpreadInAngstroms,
        double largestQuantumToThermalRatio, double wellDepthInElectronVolts, double? probabilityNearWalls)
    {
        double lambda = DeBroglieWavelengthInAngstroms(mass, temperature);
        Preconditions.CheckPositive(rmsSpreadInAngstroms, nameof(rmsSpreadInAngstroms));
        Preconditions.CheckNonNegative(largestQuantumToThermalRatio, nameof(largestQuantumToThermalRatio));
        if (double.IsNaN(wellDepthInElectronVolts) || wellDepthInElectronVolts <= 0)
        {
            throw new ArgumentOutOfRangeException(nameof(wellDepthInElectronVolts), wellDepthInElectronVolts,
                $"wellDepthInElectronVolts = {Preconditions.Format(wellDepthInElectronVolts)} is out of range; it must be greater than 0 (+∞ allowed).");
        }
        if (probabilityNearWalls is double wm)
        {
            Preconditions.CheckRange(wm, 0.0, 1.0, nameof(probabilityNearWalls));
        }
        double x = largestQuantumToThermalRatio;
        double ratio = x < 1e-8 ? 1 : 0.5 * x / Math.Tanh(0.5 * x);
        double kt = temperature.ThermalEnergyInElectronVolts;
        double escape = double.IsPositiveInfinity(wellDepthInElectronVolts) ? 0 : kt / wellDepthInElectronVolts;
        var warnings = ImmutableArray.CreateBuilder<Warning>();
        var c = CultureInfo.InvariantCulture;
        if (ratio > QuantumVarianceRatioThreshold)
        {
            warnings.Add(new Warning(WarningCodes.QuantumEffects, string.Format(c,
                "Classical statistics are not reliable here: hbar*omega/kT = {0:G3}, so the quantum harmonic mean-square displacement is {1:P0} larger than the classical one (zero-point motion)." + QuantumAdvice,
                x, ratio - 1)));
        }
        if (lambda > DeBroglieToRmsThreshold * rmsSpreadInAngstroms)
        {
            warnings.Add(new Warning(WarningCodes.DeBroglieWavelength, string.Format(c,
                "The thermal de Broglie wavelength h/sqrt(2*pi*m*kB*T) = {0:G3} Å is {1:G3} times the RMS spread {2:G3} Å: the particle is not a classical point at this temperature.",
                lambda, lambda / rmsSpreadInAngstroms, rmsSpreadInAngstroms)));
        }
        if (escape > EscapeRiskThreshold)
        {
            warnings.Add(new Warning(WarningCodes.EscapeRisk, string.Format(c,
                "kT is {0:P1} of the well depth ({1:G4} eV), so the Boltzmann factor at the well's edge is e^(-depth/kT) = {2:G2}: {3}, and the answer depends on the window or confinement that holds it.",
                escape, wellDepthInElectronVolts, Math.Exp(-1 / escape), EscapeLikelihood(escape))));
        }
        if (probabilityNearWalls is double w && w > ProbabilityNearWallsThreshold)
        {
            warnings.Add(new Warning(WarningCodes.WallMass, string.Format(c,
                "{0:P1} of the probability lies within one RMS spread ({1:G3} Å) of the walls: the walls, not only the potential, hold the particle, so the mean and spread depend on where the walls are. Move the walls out, or state the window with the result.",
                w, rmsSpreadInAngstroms)));
        }
        return new ValidityAssessment(lambda, rmsSpreadInAngstroms, x, ratio, escape, probabilityNearWalls, warnings.ToImmutable());
    }

    /// <summary>How readily a particle leaves over a barrier at kT/barrier = <paramref name="ratio"/>, in words that scale with e^(−1/ratio).</summary>
    internal static string EscapeLikelihood(double ratio) => ratio switch
    {
        < 0.1 => "leaving is rare on the time of a run but not excluded",
        < 0.2 => "the particle reaches the edge now and then and can leave over a long run",
        _ => "the particle leaves readily",
    };

    /// <summary>Assesses a line or radial landscape at one temperature, from its exact distribution and harmonic estimate.</summary>
    /// <typeparam name="TPotential">The potential type.</typeparam>
    /// <param name="landscape">The landscape; its potential must have a well inside the window.</param>
    /// <param name="mass">The particle's mass.</param>
    /// <param name="temperature">The temperature.</param>
    public static ValidityAssessment AssessPair<TPotential>(PairLandscape<TPotential> landscape, Mass mass, Temperature temperature)
        where TPotential : struct, IPairPotential
    {
        var harmonic = PairAnalysis.Harmonic(landscape, mass, temperature);
        var exact = ExactPairDistribution.Compute(landscape, temperature);
        var well = PairAnalysis.RequireWellInside(landscape);
        return Assess(mass, temperature, exact.RmsInAngstroms, harmonic.QuantumToThermalRatio, well.WellDepthInElectronVolts, exact.ProbabilityNearWalls);
    }
}
