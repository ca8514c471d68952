using System;
using System.Globalization;
using ThermalSampling.Internal;

namespace ThermalSampling.Units;

/// <summary>
/// An energy. Stored in electronvolts, the library's canonical energy unit; build it with a
/// <c>From…</c> factory that names the unit and read it with an <c>In…</c> property.
/// </summary>
public readonly record struct Energy : IComparable<Energy>
{
    private Energy(double electronVolts) => InElectronVolts = electronVolts;

    /// <summary>The energy in eV.</summary>
    public double InElectronVolts { get; }

    /// <summary>The energy in meV.</summary>
    public double InMillielectronVolts => InElectronVolts * 1e3;

    /// <summary>The energy per mole, in kJ/mol.</summary>
    public double InKilojoulesPerMole => InElectronVolts * EnergyConversion.KilojoulePerMolePerElectronVolt;

    /// <summary>The energy per mole, in kcal/mol (thermochemical calorie, 4.184 J).</summary>
    public double InKilocaloriesPerMole => InElectronVolts * EnergyConversion.KilocaloriePerMolePerElectronVolt;

    /// <summary>The energy divided by the Boltzmann constant, in K.</summary>
    public double InKelvin => InElectronVolts / PhysicalConstants.BoltzmannElectronVoltPerKelvin;

    /// <summary>The energy in hartree.</summary>
    public double InHartrees => InElectronVolts * PhysicalConstants.ElementaryChargeCoulomb / PhysicalConstants.HartreeJoule;

    /// <summary>The energy in zeptojoules (1e-21 J).</summary>
    public double InZeptojoules => InElectronVolts * PhysicalConstants.ElementaryChargeCoulomb * 1e21;

    /// <summary>The energy in joules.</summary>
    public double InJoules => InElectronVolts * PhysicalConstants.ElementaryChargeCoulomb;

    /// <summary>Zero energy.</summary>
    public static Energy Zero => default;

    /// <summary>An energy given in eV.</summary>
    /// <param name="electronVolts">The value in eV; must be finite.</param>
    public static Energy FromElectronVolts(double electronVolts) => new(Preconditions.CheckFinite(electronVolts, nameof(electronVolts)));

    /// <summary>An energy given in meV.</summary>
    /// <param name="millielectronVolts">The value in meV; must be finite.</param>
    public static Energy FromMillielectronVolts(double millielectronVolts) => new(Preconditions.CheckFinite(millielectronVolts, nameof(millielectronVolts)) * 1e-3);

    /// <summary>A molar energy given in kJ/mol, taken per particle.</summary>
    /// <param name="kilojoulesPerMole">The value in kJ/mol; must be finite.</param>
    public static Energy FromKilojoulesPerMole(double kilojoulesPerMole) => new(Preconditions.CheckFinite(kilojoulesPerMole, nameof(kilojoulesPerMole)) / EnergyConversion.KilojoulePerMolePerElectronVolt);

    /// <summary>A molar energy given in kcal/mol (thermochemical calorie), taken per particle.</summary>
    /// <param name="kilocaloriesPerMole">The value in kcal/mol; must be finite.</param>
    public static Energy FromKilocaloriesPerMole(double kilocaloriesPerMole) => new(Preconditions.CheckFinite(kilocaloriesPerMole, nameof(kilocaloriesPerMole)) / EnergyConversion.KilocaloriePerMolePerElectronVolt);

    /// <summary>An energy given as E/kB in K (as in "ε/kB = 119.8 K").</summary>
    /// <param name="kelvin">The value of E/kB in K; must be finite.</param>
    public static Energy FromKelvin(double kelvin) => new(Preconditions.CheckFinite(kelvin, nameof(kelvin)) * PhysicalConstants.BoltzmannElectronVoltPerKelvin);

    /// <summary>An energy given in hartree.</summary>
    /// <param name="hartrees">The value in hartree; must be finite.</param>
    public static Energy FromHartrees(double hartrees) => new(Preconditions.CheckFinite(hartrees, nameof(hartrees)) * PhysicalConstants.HartreeJoule / PhysicalConstants.ElementaryChargeCoulomb);

    /// <summary>An energy given in zeptojoules (1e-21 J).</summary>
    /// <param name="zeptojoules">The value in zJ; must be finite.</param>
    public static Energy FromZeptojoules(double zeptojoules) => new(Preconditions.CheckFinite(zeptojoules, nameof(zeptojoules)) * 1e-21 / PhysicalConstants.ElementaryChargeCoulomb);

    /// <summary>An energy given in joules.</summary>
    /// <param name="joules">The value in J; must be finite.</param>
    public static Energy FromJoules(double joules) => new(Preconditions.CheckFinite(joules, nameof(joules)) / PhysicalConstants.ElementaryChargeCoulomb);

    /// <inheritdoc/>
    public int CompareTo(Energy other) => InElectronVolts.CompareTo(other.InElectronVolts);

    /// <inheritdoc/>
    public override string ToString() => InElectronVolts.ToString("G6", CultureInfo.InvariantCulture) + " eV";
}

/// <summary>
/// A length. Stored in ångström, the library's canonical length unit.
/// </summary>
public readonly record struct Length : IComparable<Length>
{
    private Length(double angstroms) => InAngstroms = angstroms;

    /// <summary>The length in Å.</summary>
    public double InAngstroms { get; }

    /// <summary>The length in nm.</summary>
    public double InNanometres => InAngstroms * 0.1;

    /// <summary>The length in pm.</summary>
    public double InPicometres => InAngstroms * 100;

    /// <summary>The length in bohr (atomic units of length).</summary>
    public double InBohr => InAngstroms * 1e-10 / PhysicalConstants.BohrRadiusMetre;

    /// <summary>The length in m.</summary>
    public double InMetres => InAngstroms * 1e-10;

    /// <summary>A length given in Å.</summary>
    /// <param name="angstroms">The value in Å; must be finite.</param>
    public static Length FromAngstroms(double angstroms) => new(Preconditions.CheckFinite(angstroms, nameof(angstroms)));

    /// <summary>A length given in nm.</summary>
    /// <param name="nanometres">The value in nm; must be finite.</param>
    public static Length FromNanometres(double nanometres) => new(Preconditions.CheckFinite(nanometres, nameof(nanometres)) * 10);

    /// <summary>A length given in pm.</summary>
    /// <param name="picometres">The value in pm; must be finite.</param>
    public static Length FromPicometres(double picometres) => new(Preconditions.CheckFinite(picometres, nameof(picometres)) * 0.01);

    /// <summary>A length given in bohr.</summary>
    /// <param name="bohr">The value in bohr; must be finite.</param>
    public static Length FromBohr(double bohr) => new(Preconditions.CheckFinite(bohr, nameof(bohr)) * PhysicalConstants.BohrRadiusMetre * 1e10);

    /// <summary>A length given in m.</summary>
    /// <param name="metres">The value in m; must be finite.</param>
    public static Length FromMetres(double metres) => new(Preconditions.CheckFinite(metres, nameof(metres)) * 1e10);

    /// <inheritdoc/>
    public int CompareTo(Length other) => InAngstroms.CompareTo(other.InAngstroms);

    /// <inheritdoc/>
    public override string ToString() => InAngstroms.ToString("G6", CultureInfo.InvariantCulture) + " Å";
}

/// <summary>
/// A mass. Stored in unified atomic mass units (u, dalton), the library's canonical mass unit.
/// </summary>
public readonly record struct Mass : IComparable<Mass>
{
    private Mass(double atomicMassUnits) => InAtomicMassUnits = atomicMassUnits;

    /// <summary>The mass in u.</summary>
    public double InAtomicMassUnits { get; }

    /// <summary>The mass in kg.</summary>
    public double InKilograms => InAtomicMassUnits * PhysicalConstants.AtomicMassUnitKilogram;

    /// <summary>The mass in electron masses.</summary>
    public double InElectronMasses => InKilograms / PhysicalConstants.ElectronMassKilogram;

    /// <summary>A mass given in u; must be finite and positive.</summary>
    /// <param name="atomicMassUnits">The value in u.</param>
    public static Mass FromAtomicMassUnits(double atomicMassUnits) => new(Preconditions.CheckPositive(atomicMassUnits, nameof(atomicMassUnits)));

    /// <summary>A mass given in kg; must be finite and positive.</summary>
    /// <param name="kilograms">The value in kg.</param>
    public static Mass FromKilograms(double kilograms) => new(Preconditions.CheckPositive(kilograms, nameof(kilograms)) / PhysicalConstants.AtomicMassUnitKilogram);

    /// <summary>A mass given in electron masses; must be finite and positive.</summary>
    /// <param name="electronMasses">The value in electron masses.</param>
    public static Mass FromElectronMasses(double electronMasses) => new(Preconditions.CheckPositive(electronMasses, nameof(electronMasses)) * PhysicalConstants.ElectronMassKilogram / PhysicalConstants.AtomicMassUnitKilogram);

    /// <summary>The reduced mass m1·m2/(m1+m2) of a pair.</summary>
    /// <param name="first">The first mass.</param>
    /// <param name="second">The second mass.</param>
    public static Mass Reduced(Mass first, Mass second)
        => FromAtomicMassUnits(first.InAtomicMassUnits * second.InAtomicMassUnits / (first.InAtomicMassUnits + second.InAtomicMassUnits));

    /// <inheritdoc/>
    public int CompareTo(Mass other) => InAtomicMassUnits.CompareTo(other.InAtomicMassUnits);

    /// <inheritdoc/>
    public override string ToString() => InAtomicMassUnits.ToString("G6", CultureInfo.InvariantCulture) + " u";
}

/// <summary>
/// A thermodynamic temperature, in kelvin. Always finite and strictly positive: classical
/// Boltzmann statistics have no meaning at T = 0.
/// </summary>
public readonly record struct Temperature : IComparable<Temperature>
{
    private Temperature(double kelvin) => InKelvin = kelvin;

    /// <summary>The temperature in K.</summary>
    public double InKelvin { get; }

    /// <summary>The thermal energy kB·T.</summary>
    public Energy ThermalEnergy => Energy.FromElectronVolts(InKelvin * PhysicalConstants.BoltzmannElectronVoltPerKelvin);

    /// <summary>kB·T in eV (the canonical energy unit).</summary>
    public double ThermalEnergyInElectronVolts => InKelvin * PhysicalConstants.BoltzmannElectronVoltPerKelvin;

    /// <summary>A temperature in K; must be finite and greater than 0.</summary>
    /// <param name="kelvin">The value in K.</param>
    public static Temperature FromKelvin(double kelvin) => new(Preconditions.CheckPositive(kelvin, nameof(kelvin)));

    /// <summary>The temperature at which kB·T equals the given energy.</summary>
    /// <param name="thermalEnergy">kB·T; must be positive.</param>
    public static Temperature FromThermalEnergy(Energy thermalEnergy)
        => new(Preconditions.CheckPositive(thermalEnergy.InElectronVolts, nameof(thermalEnergy)) / PhysicalConstants.BoltzmannElectronVoltPerKelvin);

    /// <inheritdoc/>
    public int CompareTo(Temperature other) => InKelvin.CompareTo(other.InKelvin);

    /// <inheritdoc/>
    public override string ToString() => InKelvin.ToString("G6", CultureInfo.InvariantCulture) + " K";
}

/// <summary>Conversion factors between energy units that are not plain SI prefixes.</summary>
public static class EnergyConversion
{
    /// <summary>kJ/mol in one eV per particle (e·NA/1000).</summary>
    public const double KilojoulePerMolePerElectronVolt = PhysicalConstants.ElementaryChargeCoulomb * PhysicalConstants.AvogadroPerMole / 1000.0;

    /// <summary>kcal/mol in one eV per particle (thermochemical calorie, 4.184 J).</summary>
    public const double KilocaloriePerMolePerElectronVolt = KilojoulePerMolePerElectronVolt / 4.184;

    /// <summary>cm⁻¹ in one eV (E = hc·ν̃, the spectroscopists' energy unit): e/(100·h·c), about 8065.54.</summary>
    public const double ReciprocalCentimetrePerElectronVolt = PhysicalConstants.ElementaryChargeCoulomb / (100 * PhysicalConstants.PlanckJouleSecond * PhysicalConstants.SpeedOfLightMetrePerSecond);

    /// <summary>Hartrees in one eV.</summary>
    public const double HartreePerElectronVolt = PhysicalConstants.ElementaryChargeCoulomb / PhysicalConstants.HartreeJoule;
}

/// <summary>A harmonic vibration's frequency in the units the trade reads it in: quantum energy ħω, frequency ν = ω/2π, wavenumber ν/c.</summary>
/// <param name="AngularFrequencyPerSecond">ω, rad/s.</param>
public readonly record struct VibrationFrequency(double AngularFrequencyPerSecond)
{
    /// <summary>ħω, meV.</summary>
    public double InMilliElectronVolts => PhysicalConstants.ReducedPlanckJouleSecond * AngularFrequencyPerSecond / PhysicalConstants.ElementaryChargeCoulomb * 1e3;

    /// <summary>ν = ω/2π, THz.</summary>
    public double InTerahertz => AngularFrequencyPerSecond / (2 * Math.PI) * 1e-12;

    /// <summary>ν̃ = ν/c, cm⁻¹.</summary>
    public double InReciprocalCentimetres => AngularFrequencyPerSecond / (2 * Math.PI * PhysicalConstants.SpeedOfLightMetrePerSecond) / 100;
}
