using System;

namespace ThermalSampling.Units;

/// <summary>
/// CODATA 2018 values of the constants the library needs (exact where the 2019 SI defines them).
/// SI values carry the SI unit in their name; derived values in the library's canonical units
/// (eV, Å, u, K) say so too.
/// </summary>
public static class PhysicalConstants
{
    /// <summary>Boltzmann constant, J/K (exact).</summary>
    public const double BoltzmannJoulePerKelvin = 1.380649e-23;

    /// <summary>Planck constant, J·s (exact).</summary>
    public const double PlanckJouleSecond = 6.62607015e-34;

    /// <summary>Reduced Planck constant ħ = h/2π, J·s.</summary>
    public const double ReducedPlanckJouleSecond = PlanckJouleSecond / (2 * Math.PI);

    /// <summary>Elementary charge, C (exact); also the number of joules in one electronvolt.</summary>
    public const double ElementaryChargeCoulomb = 1.602176634e-19;

    /// <summary>Avogadro constant, 1/mol (exact).</summary>
    public const double AvogadroPerMole = 6.02214076e23;

    /// <summary>Unified atomic mass unit (dalton), kg (CODATA 2018 recommended value).</summary>
    public const double AtomicMassUnitKilogram = 1.66053906660e-27;

    /// <summary>Electron mass, kg (CODATA 2018 recommended value).</summary>
    public const double ElectronMassKilogram = 9.1093837015e-31;

    /// <summary>Speed of light in vacuum, m/s (exact).</summary>
    public const double SpeedOfLightMetrePerSecond = 299792458;

    /// <summary>Hartree energy, J (CODATA 2018 recommended value).</summary>
    public const double HartreeJoule = 4.3597447222071e-18;

    /// <summary>Bohr radius, m (CODATA 2018 recommended value).</summary>
    public const double BohrRadiusMetre = 5.29177210903e-11;

    /// <summary>Boltzmann constant in eV/K.</summary>
    public const double BoltzmannElectronVoltPerKelvin = BoltzmannJoulePerKelvin / ElementaryChargeCoulomb;

    /// <summary>Vacuum electric permittivity ε₀, F/m (CODATA 2018).</summary>
    public const double VacuumPermittivityFaradPerMetre = 8.8541878128e-12;

    /// <summary>e/(4πε₀), V·Å: the potential (V) at 1 Å from one elementary charge; e²/(4πε₀) = this many eV·Å (14.3996…).</summary>
    public const double CoulombVoltAngstrom = ElementaryChargeCoulomb / (4 * Math.PI * VacuumPermittivityFaradPerMetre) * 1e10;

    /// <summary>Reduced Planck constant in eV·s.</summary>
    public const double ReducedPlanckElectronVoltSecond = ReducedPlanckJouleSecond / ElementaryChargeCoulomb;

    /// <summary>
    /// ħ²/u expressed in eV·Å² (so that ħ²/(m Δ²) with m in u and Δ in Å is an energy in eV).
    /// </summary>
    public const double HbarSquaredOverAtomicMassElectronVoltAngstromSquared =
        ReducedPlanckJouleSecond * ReducedPlanckJouleSecond / AtomicMassUnitKilogram / ElementaryChargeCoulomb * 1e20;

    /// <summary>Angular frequency ω (rad/s) of a spring of stiffness k (eV/Å²) holding a mass m (u).</summary>
    /// <param name="stiffnessElectronVoltPerAngstromSquared">The spring constant in eV/Å²; must be positive.</param>
    /// <param name="massAtomicMassUnits">The mass in u; must be positive.</param>
    public static double AngularFrequency(double stiffnessElectronVoltPerAngstromSquared, double massAtomicMassUnits)
    {
        Internal.Preconditions.CheckPositive(stiffnessElectronVoltPerAngstromSquared, nameof(stiffnessElectronVoltPerAngstromSquared));
        Internal.Preconditions.CheckPositive(massAtomicMassUnits, nameof(massAtomicMassUnits));
        double kSi = stiffnessElectronVoltPerAngstromSquared * ElementaryChargeCoulomb * 1e20; // J/m²
        double mSi = massAtomicMassUnits * AtomicMassUnitKilogram;
        return Math.Sqrt(kSi / mSi);
    }
}
