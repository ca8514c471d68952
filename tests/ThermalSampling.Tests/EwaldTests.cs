using System;
using System.Collections.Generic;
using System.Collections.Immutable;
using System.Linq;
using ThermalSampling.Landscapes;
using ThermalSampling.Units;
using Xunit;

namespace ThermalSampling.Tests;

/// <summary>Ewald summation of a crystal's point charges (Ewald 1921; cut-offs after Kolafa &amp; Perram 1992).</summary>
public class EwaldTests
{
    private static Structure Cubic(double a, params (string Species, double X, double Y, double Z)[] fractional)
        => new([.. fractional.Select(f => new StructureAtom(f.Species, new Position(a * f.X, a * f.Y, a * f.Z)))],
            [new Position(a, 0, 0), new Position(0, a, 0), new Position(0, 0, a)], "invented cell");

    private static Structure RockSalt(double a) => Cubic(a,
        ("Na", 0, 0, 0), ("Na", 0, 0.5, 0.5), ("Na", 0.5, 0, 0.5), ("Na", 0.5, 0.5, 0),
        ("Cl", 0.5, 0, 0), ("Cl", 0, 0.5, 0), ("Cl", 0, 0, 0.5), ("Cl", 0.5, 0.5, 0.5));

    private static readonly Dictionary<string, double> Unit = new() { ["Na"] = 1, ["Cl"] = -1, ["Cs"] = 1 };

    /// <summary>
    /// The Madelung constant of rock salt, 1.747565, and of caesium chloride, 1.762675, referred to the nearest-neighbour
    /// distance ([memory: Kittel, Introduction to Solid State Physics], as listed in validation-sources.md): from the
    /// potential the library computes at a cation site from every other ion, M = −φ r₀/k_e, to 1e-6.
    /// </summary>
    [Fact]
    public void Madelung_constants_of_rock_salt_and_caesium_chloride()
    {
        double a = 5.0;
        var salt = EwaldField.Create(RockSalt(a), Unit);
        double mSalt = -salt.PotentialInVolts(Position.Origin, excluding: 0) * (a / 2) / Units.PhysicalConstants.CoulombVoltAngstrom;
        Assert.Equal(1.747565, mSalt, 1e-6);
        var cscl = EwaldField.Create(Cubic(4.1, ("Cs", 0, 0, 0), ("Cl", 0.5, 0.5, 0.5)), Unit);
        double mCs = -cscl.PotentialInVolts(Position.Origin, excluding: 0) * (4.1 * Math.Sqrt(3) / 2) / Units.PhysicalConstants.CoulombVoltAngstrom;
        Assert.Equal(1.762675, mCs, 1e-6);
        Assert.Equal(14.3996454784, Units.PhysicalConstants.CoulombVoltAngstrom, 1e-9); // e²/(4πε₀) in eV·Å (CODATA 2018)
    }

    /// <summary>The potential does not depend on the splitting α (within the requested accuracy), at a site and off it.</summary>
    [Fact]
    public void The_potential_is_independent_of_the_splitting()
    {
        var structure = RockSalt(5.0);
        var points = new[] { Position.Origin, new Position(0.3, -0.2, 0.1), new Position(1.2, 0.7, 0.4) };
        double[] Values(double? alpha) => [.. points.Select(p => EwaldField.Create(structure, Unit, 1e-12, alpha).PotentialInVolts(p, excluding: 0))];
        var balanced = Values(null);
        foreach (double alpha in new[] { 0.4, 0.6, 0.9 })
        {
            var other = Values(alpha);
            for (int i = 0; i < points.Length; i++)
            {
                Assert.Equal(balanced[i], other[i], 1e-8);
            }
        }
    }

    /// <summary>A cell that is not neutral is refused naming its net charge; a species without a charge is named.</summary>
    [Fact]
    public void Charged_cells_and_missing_charges_are_refused()
    {
        var ex = Assert.Throws<ArgumentException>(() => EwaldField.Create(RockSalt(5.0), new Dictionary<string, double> { ["Na"] = 1, ["Cl"] = -0.5 }));
        Assert.Contains("not neutral: its net charge is 2 e", ex.Message);
        var missing = Assert.Throws<ArgumentException>(() => EwaldField.Create(RockSalt(5.0), new Dictionary<string, double> { ["Na"] = 1 }));
        Assert.Contains("no entry for species Cl", missing.Message);
    }
}
