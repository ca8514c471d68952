using System;
using ThermalSampling.Units;
using Xunit;

namespace ThermalSampling.Tests;

public class UnitsTests
{
    // Source: Sources.Codata2018 (derived constants as tabulated there).
    [Fact]
    public void Boltzmann_constant_in_eV_per_K_matches_CODATA_2018()
        => Assert.Equal(8.617333262e-5, PhysicalConstants.BoltzmannElectronVoltPerKelvin, 1e-14);

    [Fact]
    public void Reduced_Planck_constant_in_eV_s_matches_CODATA_2018()
        => Assert.Equal(6.582119569e-16, PhysicalConstants.ReducedPlanckElectronVoltSecond, 1e-25);

    [Fact]
    public void Hartree_in_eV_matches_CODATA_2018()
        => Assert.Equal(27.211386245988, Energy.FromHartrees(1).InElectronVolts, 1e-10);

    [Fact]
    public void Bohr_radius_in_angstrom_matches_CODATA_2018()
        => Assert.Equal(0.529177210903, Length.FromBohr(1).InAngstroms, 1e-12);

    [Fact]
    public void Electron_volt_per_particle_in_molar_units_matches_CODATA_2018()
    {
        // 1 eV = 96.485332 kJ/mol = 23.060548 kcal/mol (thermochemical calorie) = 11604.518 K.
        Assert.Equal(96.4853321233, Energy.FromElectronVolts(1).InKilojoulesPerMole, 1e-8);
        Assert.Equal(23.0605478, Energy.FromElectronVolts(1).InKilocaloriesPerMole, 1e-6);
        Assert.Equal(11604.51812, Energy.FromElectronVolts(1).InKelvin, 1e-4);
        Assert.Equal(160.2176634, Energy.FromElectronVolts(1).InZeptojoules, 1e-9);
    }

    [Fact]
    public void Electron_mass_in_u_matches_CODATA_2018()
        => Assert.Equal(5.48579909065e-4, Mass.FromElectronMasses(1).InAtomicMassUnits, 1e-14);

    [Theory]
    [InlineData(1.0)]
    [InlineData(0.0123)]
    [InlineData(-7.5)]
    public void Energy_round_trips_through_every_unit(double value)
    {
        Assert.Equal(value, Energy.FromMillielectronVolts(Energy.FromElectronVolts(value).InMillielectronVolts).InElectronVolts, 12);
        Assert.Equal(value, Energy.FromKilojoulesPerMole(Energy.FromElectronVolts(value).InKilojoulesPerMole).InElectronVolts, 12);
        Assert.Equal(value, Energy.FromKilocaloriesPerMole(Energy.FromElectronVolts(value).InKilocaloriesPerMole).InElectronVolts, 12);
        Assert.Equal(value, Energy.FromKelvin(Energy.FromElectronVolts(value).InKelvin).InElectronVolts, 12);
        Assert.Equal(value, Energy.FromHartrees(Energy.FromElectronVolts(value).InHartrees).InElectronVolts, 12);
        Assert.Equal(value, Energy.FromZeptojoules(Energy.FromElectronVolts(value).InZeptojoules).InElectronVolts, 12);
        Assert.Equal(value, Energy.FromJoules(Energy.FromElectronVolts(value).InJoules).InElectronVolts, 12);
    }

    [Fact]
    public void Lengths_convert_by_their_definitions()
    {
        Assert.Equal(10.0, Length.FromNanometres(1).InAngstroms, 14);
        Assert.Equal(0.01, Length.FromPicometres(1).InAngstroms, 14);
        Assert.Equal(1e10, Length.FromMetres(1).InAngstroms, 3);
        Assert.Equal(250.0, Length.FromAngstroms(2.5).InPicometres, 12);
    }

    [Fact]
    public void Temperature_gives_thermal_energy()
        => Assert.Equal(300 * 8.617333262e-5, Temperature.FromKelvin(300).ThermalEnergyInElectronVolts, 1e-12);

    [Theory]
    [InlineData(double.NaN)]
    [InlineData(double.PositiveInfinity)]
    [InlineData(0.0)]
    [InlineData(-1.0)]
    public void Bad_temperature_names_the_parameter_value_and_range(double kelvin)
    {
        var ex = Assert.Throws<ArgumentOutOfRangeException>(() => Temperature.FromKelvin(kelvin));
        Assert.Equal("kelvin", ex.ParamName);
        Assert.Contains("greater than 0", ex.Message);
    }

    [Theory]
    [InlineData(double.NaN)]
    [InlineData(0.0)]
    [InlineData(-4.0)]
    public void Bad_mass_is_rejected(double u)
        => Assert.Equal("atomicMassUnits", Assert.Throws<ArgumentOutOfRangeException>(() => Mass.FromAtomicMassUnits(u)).ParamName);

    [Fact]
    public void Non_finite_energy_is_rejected()
        => Assert.Equal("electronVolts", Assert.Throws<ArgumentOutOfRangeException>(() => Energy.FromElectronVolts(double.NegativeInfinity)).ParamName);

    [Fact]
    public void Reduced_mass_of_equal_masses_is_half()
        => Assert.Equal(19.974, Mass.Reduced(Mass.FromAtomicMassUnits(39.948), Mass.FromAtomicMassUnits(39.948)).InAtomicMassUnits, 12);

    [Fact]
    public void Vibration_frequencies_convert_as_the_CODATA_energy_table_says()
    {
        // Source: Sources.Codata2018 (energy equivalents): 1 meV = 0.241799 THz (h·ν) and 8.06554 cm⁻¹ (h·c·ν̃).
        double omega = 1e-3 * PhysicalConstants.ElementaryChargeCoulomb / PhysicalConstants.ReducedPlanckJouleSecond;
        var f = new VibrationFrequency(omega);
        Assert.Equal(1.0, f.InMilliElectronVolts, 12);
        Assert.Equal(0.2417989, f.InTerahertz, 6);
        Assert.Equal(8.065544, f.InReciprocalCentimetres, 5);
        Assert.Equal(8065.544, EnergyConversion.ReciprocalCentimetrePerElectronVolt, 2);
        Assert.Equal(1 / 27.211386, EnergyConversion.HartreePerElectronVolt, 8);
    }
}
