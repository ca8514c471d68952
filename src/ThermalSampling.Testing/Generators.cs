using FsCheck;
using FsCheck.Fluent;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Units;

namespace ThermalSampling.Testing;

/// <summary>
/// FsCheck generators for property tests: physically sensible potentials, landscapes that contain their minimum, and
/// temperatures, plus the corner cases the library must refuse. Ranges are in the canonical units (eV, Å, K).
/// </summary>
public static class ThermalGenerators
{
    private static Gen<double> Between(double lower, double upper, int steps = 10_000)
        => Gen.Choose(0, steps).Select(i => lower + (upper - lower) * i / steps);

    /// <summary>Lennard-Jones potentials with the minimum r_min in [2, 5] Å and the well depth ε in [1 meV, 0.5 eV].</summary>
    public static Gen<LennardJones> LennardJones() =>
        from rMin in Between(2, 5)
        from epsilon in Between(1e-3, 0.5)
        select Potentials.LennardJones.FromMinimum(Length.FromAngstroms(rMin), Energy.FromElectronVolts(epsilon));

    /// <summary>Morse potentials with D in [0.05, 2] eV, a in [0.8, 2.5] 1/Å and re in [1.5, 4] Å.</summary>
    public static Gen<Morse> Morse() =>
        from d in Between(0.05, 2)
        from a in Between(0.8, 2.5)
        from re in Between(1.5, 4)
        select new Morse(Energy.FromElectronVolts(d), a, Length.FromAngstroms(re));

    /// <summary>Line landscapes in a Morse well whose window holds the minimum with room on both sides.</summary>
    public static Gen<PairLandscape<Morse>> MorseLine() =>
        from m in Morse()
        from inner in Between(0.6, 0.9)
        from outer in Between(1.3, 2.0)
        select PairLandscape.Line(m, Length.FromAngstroms(inner * m.EquilibriumDistanceInAngstroms), Length.FromAngstroms(outer * m.EquilibriumDistanceInAngstroms));

    /// <summary>Temperatures from 1 K to 2000 K, spread evenly on a logarithmic scale.</summary>
    public static Gen<Temperature> Temperature() =>
        Between(0, System.Math.Log(2000)).Select(x => Units.Temperature.FromKelvin(System.Math.Exp(x)));

    /// <summary>Values no positive physical parameter (mass, temperature, well depth, width) accepts: NaN, ±∞, zero and negative.</summary>
    public static Gen<double> HostileValues() =>
        Gen.Elements(double.NaN, double.PositiveInfinity, double.NegativeInfinity, 0.0, -1.0, -1e-300, -5e5);

    /// <summary>Arbitraries wrapping the generators, for <c>Prop.ForAll</c>.</summary>
    public static Arbitrary<PairLandscape<Morse>> MorseLineArbitrary() => MorseLine().ToArbitrary();

    /// <summary>Arbitrary temperatures.</summary>
    public static Arbitrary<Temperature> TemperatureArbitrary() => Temperature().ToArbitrary();
}
