using System;
using System.Globalization;
using ThermalSampling.Internal;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Units;

namespace ThermalSampling.Analysis;

/// <summary>The harmonic (second-order Taylor) picture of a pair at its minimum.</summary>
/// <param name="EquilibriumDistanceInAngstroms">r_min, the position of the minimum, Å.</param>
/// <param name="StiffnessElectronVoltsPerAngstromSquared">k = V″(r_min), eV/Å².</param>
/// <param name="AngularFrequencyPerSecond">ω = √(k/m), rad/s.</param>
/// <param name="QuantumEnergyInElectronVolts">ħω, eV.</param>
/// <param name="QuantumToThermalRatio">ħω/kT (dimensionless); well above 1 means quantum statistics matter.</param>
/// <param name="ClassicalVarianceInAngstromsSquared">kT/k, Å² (equipartition).</param>
/// <param name="QuantumVarianceInAngstromsSquared">(ħ/2mω) coth(ħω/2kT), Å² (the quantum harmonic oscillator).</param>
/// <param name="ZeroPointVarianceInAngstromsSquared">ħ/(2mω), Å², the T → 0 limit of the quantum variance.</param>
/// <param name="WignerKirkwoodVarianceInAngstromsSquared">(kT/k)[1 + (ħω/kT)²/12], Å²: the first quantum correction (Wigner 1932; Kirkwood 1933).</param>
public sealed record PairHarmonicEstimate(
    double EquilibriumDistanceInAngstroms,
    double StiffnessElectronVoltsPerAngstromSquared,
    double AngularFrequencyPerSecond,
    double QuantumEnergyInElectronVolts,
    double QuantumToThermalRatio,
    double ClassicalVarianceInAngstromsSquared,
    double QuantumVarianceInAngstromsSquared,
    double ZeroPointVarianceInAngstromsSquared,
    double WignerKirkwoodVarianceInAngstromsSquared)
{
    /// <summary>√(kT/k), Å.</summary>
    public double ClassicalRmsInAngstroms => Math.Sqrt(ClassicalVarianceInAngstromsSquared);

    /// <summary>The vibration's frequency (ħω in meV, ν in THz, ν̃ in cm⁻¹).</summary>
    public Units.VibrationFrequency Frequency => new(AngularFrequencyPerSecond);

    /// <summary>The quantum RMS spread, Å.</summary>
    public double QuantumRmsInAngstroms => Math.Sqrt(QuantumVarianceInAngstromsSquared);
}

/// <summary>The first-order (in kT) classical anharmonic estimate about the minimum of a pair.</summary>
/// <param name="MeanShiftInAngstroms">⟨r⟩ − r_min to first order in kT, Å.</param>
/// <param name="VarianceInAngstromsSquared">The variance to second order in kT, Å² (the harmonic kT/k plus the first anharmonic correction).</param>
/// <param name="ThirdCumulantInAngstromsCubed">The third cumulant to leading order, −V‴(kT)²/k³, Å³.</param>
/// <param name="RelativeVarianceCorrection">(variance − kT/k)/(kT/k): the size of the correction; above about 0.3 the expansion is not trustworthy.</param>
public sealed record PairFirstOrderEstimate(
    double MeanShiftInAngstroms,
    double VarianceInAngstromsSquared,
    double ThirdCumulantInAngstromsCubed,
    double RelativeVarianceCorrection);

/// <summary>Harmonic and perturbative analysis of line and radial pair landscapes (no sampling).</summary>
public static class PairAnalysis
{
    /// <summary>The minimum of the landscape's potential, which must lie strictly inside the window.</summary>
    /// <typeparam name="TPotential">The potential type.</typeparam>
    /// <param name="landscape">The landscape.</param>
    /// <exception cref="LandscapeException">When the potential has no well or its minimum lies outside the window.</exception>
    public static PotentialWell RequireWellInside<TPotential>(PairLandscape<TPotential> landscape) where TPotential : struct, IPairPotential
    {
        Preconditions.CheckNotNull(landscape, nameof(landscape));
        var well = landscape.Potential.Well ?? throw new LandscapeException(
            $"The potential '{landscape.Potential.Description}' has no minimum, so there is no harmonic or perturbative estimate; use the exact distribution or sampling.");
        if (!(well.EquilibriumDistanceInAngstroms > landscape.WindowLowerInAngstroms && well.EquilibriumDistanceInAngstroms < landscape.WindowUpperInAngstroms))
        {
            throw new LandscapeException(string.Create(CultureInfo.InvariantCulture,
                $"The potential's minimum at {well.EquilibriumDistanceInAngstroms:G6} Å lies outside the window [{landscape.WindowLowerInAngstroms:G6}, {landscape.WindowUpperInAngstroms:G6}] Å; harmonic and perturbative estimates do not apply."));
        }
        return well;
    }

    /// <summary>The harmonic estimate at the minimum.</summary>
    /// <typeparam name="TPotential">The potential type.</typeparam>
    /// <param name="landscape">The landscape; the potential's minimum must lie inside its window.</param>
    /// <param name="mass">The moving particle's mass (for a free diatomic, the reduced mass: <see cref="Mass.Reduced"/>).</param>
    /// <param name="temperature">The temperature.</param>
    public static PairHarmonicEstimate Harmonic<TPotential>(PairLandscape<TPotential> landscape, Mass mass, Temperature temperature)
        where TPotential : struct, IPairPotential
    {
        var well = RequireWellInside(landscape);
        CheckArguments(mass, temperature);
        double k = landscape.Potential.Derivatives(well.EquilibriumDistanceInAngstroms).Second;
        if (!(k > 0) || !double.IsFinite(k))
        {
            throw new LandscapeException(string.Create(CultureInfo.InvariantCulture,
                $"V''(r_min) = {k:R} eV/Å² at the minimum r_min = {well.EquilibriumDistanceInAngstroms:G6} Å is not positive; the harmonic estimate needs a curved minimum."));
        }
        return HarmonicOscillator.Estimate(well.EquilibriumDistanceInAngstroms, k, mass.InAtomicMassUnits, temperature.ThermalEnergyInElectronVolts);
    }

    /// <summary>
    /// The classical first-order anharmonic estimate: with k = V″, V3 = V‴, V4 = V⁗ at the minimum r_min,
    /// line: ⟨x⟩ = −V3 kT/(2k²), Var = kT/k + (kT)²[V3²/k⁴ − V4/(2k³)];
    /// radial (weight r²): ⟨x⟩ = kT[−V3/(2k²) + 2/(k r_min)], Var = kT/k + (kT)²[V3²/k⁴ − V4/(2k³) − 2/(k² r_min²) − 2V3/(k³ r_min)].
    /// The derivation is in docs/perturbation-theory.md.
    /// </summary>
    /// <typeparam name="TPotential">The potential type.</typeparam>
    /// <param name="landscape">The landscape; the potential's minimum must lie inside its window.</param>
    /// <param name="temperature">The temperature.</param>
    public static PairFirstOrderEstimate FirstOrder<TPotential>(PairLandscape<TPotential> landscape, Temperature temperature)
        where TPotential : struct, IPairPotential
    {
        var well = RequireWellInside(landscape);
        CheckTemperature(temperature);
        var d = landscape.Potential.Derivatives(well.EquilibriumDistanceInAngstroms);
        double k = d.Second, v3 = d.Third, v4 = d.Fourth, kt = temperature.ThermalEnergyInElectronVolts, r0 = well.EquilibriumDistanceInAngstroms;
        if (!(k > 0))
        {
            throw new LandscapeException(string.Create(CultureInfo.InvariantCulture,
                $"V''(r_min) = {k:R} eV/Å² is not positive; the perturbative estimate needs a curved minimum."));
        }
        double shift = -v3 * kt / (2 * k * k);
        double second = v3 * v3 / (k * k * k * k) - v4 / (2 * k * k * k);
        if (landscape.Geometry == SeparationGeometry.Radial)
        {
            shift += 2 * kt / (k * r0);
            second += -2 / (k * k * r0 * r0) - 2 * v3 / (k * k * k * r0);
        }
        double harmonic = kt / k;
        double variance = harmonic + kt * kt * second;
        double kappa3 = -v3 * kt * kt / (k * k * k);
        return new PairFirstOrderEstimate(shift, variance, kappa3, (variance - harmonic) / harmonic);
    }

    internal static void CheckArguments(Mass mass, Temperature temperature)
    {
        Preconditions.CheckPositive(mass.InAtomicMassUnits, nameof(mass));
        CheckTemperature(temperature);
    }

    internal static void CheckTemperature(Temperature temperature)
        => Preconditions.CheckPositive(temperature.InKelvin, nameof(temperature));
}

/// <summary>Closed forms for one harmonic mode.</summary>
public static class HarmonicOscillator
{
    /// <summary>The harmonic estimate for stiffness k, mass m and thermal energy kT, all in canonical units.</summary>
    /// <param name="equilibriumDistanceInAngstroms">The minimum, Å (reported back).</param>
    /// <param name="stiffnessElectronVoltsPerAngstromSquared">k, eV/Å²; must be positive.</param>
    /// <param name="massInAtomicMassUnits">m, u; must be positive.</param>
    /// <param name="thermalEnergyInElectronVolts">kT, eV; must be positive.</param>
    public static PairHarmonicEstimate Estimate(double equilibriumDistanceInAngstroms, double stiffnessElectronVoltsPerAngstromSquared,
        double massInAtomicMassUnits, double thermalEnergyInElectronVolts)
    {
        double k = Preconditions.CheckPositive(stiffnessElectronVoltsPerAngstromSquared, nameof(stiffnessElectronVoltsPerAngstromSquared));
        double m = Preconditions.CheckPositive(massInAtomicMassUnits, nameof(massInAtomicMassUnits));
        double kt = Preconditions.CheckPositive(thermalEnergyInElectronVolts, nameof(thermalEnergyInElectronVolts));
        double omega = PhysicalConstants.AngularFrequency(k, m);
        double hw = PhysicalConstants.ReducedPlanckElectronVoltSecond * omega;
        double x = hw / kt;
        double classical = kt / k;
        double zeroPoint = hw / (2 * k); // ħ/(2mω) = ħω/(2k)
        return new PairHarmonicEstimate(equilibriumDistanceInAngstroms, k, omega, hw, x, classical,
            QuantumVariance(zeroPoint, x), zeroPoint, classical * (1 + x * x / 12));
    }

    /// <summary>(ħ/2mω) coth(ħω/2kT) written as zeroPoint·coth(x/2), stable for small and large x.</summary>
    internal static double QuantumVariance(double zeroPointVariance, double quantumToThermalRatio)
    {
        double half = 0.5 * quantumToThermalRatio;
        double coth = half < 1e-4 ? 1 / half + half / 3 : half > 20 ? 1.0 : 1 / Math.Tanh(half);
        return zeroPointVariance * coth;
    }
}
