using System;
using System.Collections.Immutable;
using System.Globalization;
using MathNet.Numerics.LinearAlgebra;
using ThermalSampling.Internal;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Units;

namespace ThermalSampling.Analysis;

/// <summary>One normal mode of a particle at a site.</summary>
/// <param name="Direction">The unit eigenvector of the Hessian.</param>
/// <param name="StiffnessElectronVoltsPerAngstromSquared">The Hessian eigenvalue k, eV/Å².</param>
/// <param name="AngularFrequencyPerSecond">ω = √(k/m), rad/s.</param>
/// <param name="QuantumToThermalRatio">ħω/kT.</param>
/// <param name="ClassicalVarianceInAngstromsSquared">kT/k along the mode, Å².</param>
/// <param name="QuantumVarianceInAngstromsSquared">(ħ/2mω) coth(ħω/2kT) along the mode, Å².</param>
public sealed record NormalMode(Position Direction, double StiffnessElectronVoltsPerAngstromSquared, double AngularFrequencyPerSecond,
    double QuantumToThermalRatio, double ClassicalVarianceInAngstromsSquared, double QuantumVarianceInAngstromsSquared)
{
    /// <summary>The mode's frequency (ħω in meV, ν in THz, ν̃ in cm⁻¹).</summary>
    public Units.VibrationFrequency Frequency => new(AngularFrequencyPerSecond);
}

/// <summary>The harmonic picture of a particle among fixed sites, with the first-order mean shift.</summary>
/// <param name="Minimum">The energy minimum reached from the centre, Å.</param>
/// <param name="MinimumEnergyInElectronVolts">The energy there, eV.</param>
/// <param name="Hessian">The Hessian at the minimum, eV/Å².</param>
/// <param name="Modes">The three normal modes, softest first.</param>
/// <param name="ClassicalCovariance">kT·H⁻¹, Å².</param>
/// <param name="QuantumCovariance">Σ_modes (ħ/2mω) coth(ħω/2kT) v vᵀ, Å².</param>
/// <param name="FirstOrderMeanShift">⟨x⟩ − x_min to first order in kT: −(kT/2) Σ G_ij T_jkl G_kl with G = H⁻¹ and T the third-derivative tensor, Å.</param>
public sealed record SiteHarmonicEstimate(Position Minimum, double MinimumEnergyInElectronVolts, SymmetricTensor Hessian,
    ImmutableArray<NormalMode> Modes, SymmetricTensor ClassicalCovariance, SymmetricTensor QuantumCovariance, Position FirstOrderMeanShift)
{
    /// <summary>The classical mean-square displacement ⟨|u|²⟩ = tr(kT H⁻¹), Å².</summary>
    public double ClassicalMeanSquareDisplacement => ClassicalCovariance.Trace;

    /// <summary>The quantum harmonic mean-square displacement, Å².</summary>
    public double QuantumMeanSquareDisplacement => QuantumCovariance.Trace;

    /// <summary>U_iso = MSD/3 (classical), Å².</summary>
    public double ClassicalIsotropicDisplacement => ClassicalMeanSquareDisplacement / 3;

    /// <summary>The Debye–Waller factor B = 8π² U_iso (classical), Å² (IUCr convention; Trueblood et al., Acta Cryst. A52, 770 (1996)).</summary>
    public double ClassicalDebyeWallerB => DebyeWaller.FromIsotropicDisplacement(ClassicalIsotropicDisplacement);

    /// <summary>B = 8π² U_iso from the quantum harmonic covariance, Å².</summary>
    public double QuantumDebyeWallerB => DebyeWaller.FromIsotropicDisplacement(QuantumMeanSquareDisplacement / 3);
}

/// <summary>Debye–Waller conversions (IUCr conventions; Trueblood et al., Acta Cryst. A52, 770 (1996)).</summary>
public static class DebyeWaller
{
    /// <summary>B = 8π² U_iso, Å².</summary>
    /// <param name="isotropicDisplacementInAngstromsSquared">U_iso = ⟨u_x²⟩, Å²; must be finite and at least 0.</param>
    public static double FromIsotropicDisplacement(double isotropicDisplacementInAngstromsSquared)
        => 8 * Math.PI * Math.PI * Preconditions.CheckNonNegative(isotropicDisplacementInAngstromsSquared, nameof(isotropicDisplacementInAngstromsSquared));

    /// <summary>The anisotropic B^ij = 8π² U^ij, Å².</summary>
    /// <param name="covariance">The displacement covariance U, Å².</param>
    public static SymmetricTensor Anisotropic(SymmetricTensor covariance)
    {
        double f = 8 * Math.PI * Math.PI;
        return new SymmetricTensor(f * covariance.XX, f * covariance.YY, f * covariance.ZZ, f * covariance.XY, f * covariance.XZ, f * covariance.YZ);
    }
}

/// <summary>Harmonic analysis of a particle among fixed sites.</summary>
public static class SiteAnalysis
{
    /// <summary>The harmonic estimate at the minimum nearest the centre, with the first-order classical mean shift.</summary>
    /// <typeparam name="TPotential">The potential type.</typeparam>
    /// <param name="landscape">The landscape.</param>
    /// <param name="mass">The particle's mass.</param>
    /// <param name="temperature">The temperature.</param>
    /// <exception cref="LandscapeException">When no bound minimum exists inside the confinement or the Hessian there is not positive definite.</exception>
    public static SiteHarmonicEstimate Harmonic<TPotential>(SiteLandscape<TPotential> landscape, Mass mass, Temperature temperature)
        where TPotential : struct, IPairPotential
    {
        Preconditions.CheckNotNull(landscape, nameof(landscape));
        PairAnalysis.CheckArguments(mass, temperature);
        var min = landscape.FindMinimum();
        var h = landscape.Hessian(min);
        var evd = h.Evd(Symmetricity.Symmetric);
        double kt = temperature.ThermalEnergyInElectronVolts;
        var modes = ImmutableArray.CreateBuilder<NormalMode>(3);
        var quantum = Matrix<double>.Build.Dense(3, 3);
        for (int i = 0; i < 3; i++)
        {
            double k = evd.EigenValues[i].Real;
            if (!(k > 0))
            {
                throw new LandscapeException(string.Create(CultureInfo.InvariantCulture,
                    $"The Hessian at the minimum {min} has eigenvalue {k:R} eV/Å², which is not positive: the site is not a stable minimum along that direction."));
            }
            var v = evd.EigenVectors.Column(i);
            var est = HarmonicOscillator.Estimate(0, k, mass.InAtomicMassUnits, kt);
            modes.Add(new NormalMode(new Position(v[0], v[1], v[2]), k, est.AngularFrequencyPerSecond, est.QuantumToThermalRatio,
                est.ClassicalVarianceInAngstromsSquared, est.QuantumVarianceInAngstromsSquared));
            quantum += est.QuantumVarianceInAngstromsSquared * v.OuterProduct(v);
        }
        var g = h.Inverse();
        var t = landscape.ThirdDerivatives(min);
        var shift = new double[3];
        for (int i = 0; i < 3; i++)
        {
            double s = 0;
            for (int j = 0; j < 3; j++)
            {
                for (int k = 0; k < 3; k++)
                {
                    for (int l = 0; l < 3; l++)
                    {
                        s += g[i, j] * t[j, k, l] * g[k, l];
                    }
                }
            }
            shift[i] = -0.5 * kt * s;
        }
        return new SiteHarmonicEstimate(min, landscape.Energy(min), SymmetricTensor.FromMatrix(h), modes.MoveToImmutable(),
            SymmetricTensor.FromMatrix(kt * g), SymmetricTensor.FromMatrix(quantum), new Position(shift[0], shift[1], shift[2]));
    }
}
