using System;
using System.Collections.Generic;
using System.Collections.Immutable;
using System.Linq;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
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

/// <summary>The Coulomb term of an ion at its site, in the hot loop's polynomial form, against Ewald and inside a site landscape.</summary>
public class CoulombSiteTests
{
    private static readonly Structure Salt = InventedStructures.RockSalt;

    private static readonly Dictionary<string, double> Charges = new() { ["Na"] = 1, ["Cl"] = -1 };

    /// <summary>
    /// The degree-8 fit of the Na ion's Coulomb energy in a ball of 0.8 Å (the nearest ion 2.5 Å away) agrees with Ewald at
    /// 200 other points in the ball to 2e-4 eV (its stated check error is below that too; the error falls like
    /// (0.8/2.5)^9 with the degree), and its Hessian at the site vanishes to 1e-3 eV/Å² (a site of
    /// cubic symmetry in a field obeying Laplace's equation feels no harmonic Coulomb term: validation-sources.md).
    /// </summary>
    [Fact]
    public void The_fast_form_agrees_with_Ewald_over_the_region()
    {
        var field = CoulombSite.Field(Salt, 0, Charges, 0.8);
        var ewald = EwaldField.Create(Salt, Charges);
        Assert.True(field.FitError < 2e-4, $"fit error {field.FitError:G3} eV");
        var random = Randomness.RandomStream.FromSeed(5);
        double worst = 0;
        for (int i = 0; i < 200; i++)
        {
            Position p;
            do
            {
                p = new Position(1.6 * random.NextUnitInterval() - 0.8, 1.6 * random.NextUnitInterval() - 0.8, 1.6 * random.NextUnitInterval() - 0.8);
            }
            while (p.Norm > 0.8);
            worst = Math.Max(worst, Math.Abs(field.Value(p) - ewald.PotentialInVolts(p, 0)));
        }
        Assert.True(worst < 2e-4, $"worst {worst:G3} eV");
        for (int i = 0; i < 3; i++)
        {
            Assert.True(Math.Abs(field.Derivative(Position.Origin, i == 0 ? 2 : 0, i == 1 ? 2 : 0, i == 2 ? 2 : 0)) < 1e-3);
        }
    }

    /// <summary>
    /// An invented ionic crystal (the rock-salt-like cell; Na–Cl Buckingham A = 1000 eV, ρ = 0.3 Å; charges ±1 e): the
    /// site Hessian of the full energy (pairs + Coulomb) by central finite differences equals the analytic one to 1e-4
    /// relative, and the sampled MSD tends to the harmonic one as T → 0 (within 3 % at 5 K).
    /// </summary>
    [Fact]
    public void An_ionic_site_has_a_consistent_Hessian_and_a_harmonic_low_temperature_limit()
    {
        var buck = new Buckingham(Energy.FromElectronVolts(1000), Length.FromAngstroms(0.3), 0);
        var neighbours = Salt.NeighboursOf(0, Length.FromAngstroms(2.6)).Select(n => n.Position).ToList();
        Assert.Equal(6, neighbours.Count);
        var field = CoulombSite.Field(Salt, 0, Charges, 0.6);
        var site = SiteLandscape.Create(buck, neighbours, Position.Origin, Confinement.Sphere(Length.FromAngstroms(0.5))).WithField(field);
        var x0 = new Position(0.05, -0.03, 0.02);
        var h = site.Hessian(x0);
        const double d = 1e-4;
        for (int i = 0; i < 3; i++)
        {
            for (int j = 0; j < 3; j++)
            {
                Position E(int a, double s) => new(a == 0 ? s : 0, a == 1 ? s : 0, a == 2 ? s : 0);
                double fd = (site.Energy(x0 + E(i, d) + E(j, d)) - site.Energy(x0 + E(i, d) - E(j, d)) - site.Energy(x0 - E(i, d) + E(j, d)) + site.Energy(x0 - E(i, d) - E(j, d))) / (4 * d * d);
                Assert.True(Math.Abs(fd - h[i, j]) < 1e-4 * Math.Max(1, Math.Abs(h[i, i])), $"H[{i},{j}] = {h[i, j]:G6}, finite differences {fd:G6}");
            }
        }
        var t = Temperature.FromKelvin(5);
        var mass = Mass.FromAtomicMassUnits(23);
        var report = ThermalSampling.SiteSampler.Run(site, mass, t, new Sampling.SamplingSettings { Seed = 6, Chains = 4, SamplesPerChain = 40_000, BurnIn = 4_000 });
        Assert.InRange(report.MeanSquareDisplacement.Value / report.Harmonic.ClassicalMeanSquareDisplacement, 0.97, 1.03);
    }
}

/// <summary>The C# builder of a structure site: the same landscape a scenario's structure landscape builds.</summary>
public class StructureSiteBuilderTests
{
    private static readonly Structure Salt = InventedStructures.RockSalt;

    /// <summary>
    /// The builder's Na site (Cl pairs by an invented Lennard-Jones, charges ±1): its energy is the hand sum of the six Cl
    /// pair terms plus the Ewald energy of the ion (within the fit's stated error); missing steps and unknown names are refused.
    /// </summary>
    [Fact]
    public void The_builder_gives_pairs_plus_the_Coulomb_term()
    {
        var lj = LennardJones.FromMinimum(Length.FromAngstroms(2.5), Energy.FromElectronVolts(0.02));
        var charges = new Dictionary<string, double> { ["Na"] = 1, ["Cl"] = -1 };
        var site = new StructureSiteBuilder(Salt).MovingAtom("Na1").Cutoff(Length.FromAngstroms(3.6)).Pair("Cl", PairForm.From(lj)).Charges(charges)
            .Confinement(Confinement.Sphere(Length.FromAngstroms(0.5))).Build();
        Assert.Equal(6, site.Sites.Length); // the twelve Na neighbours have no pair: left out (the Coulomb field covers every ion)
        var x = new Position(0.1, -0.05, 0.2);
        double pairs = Salt.NeighboursOf(0, Length.FromAngstroms(3.6)).Where(n => n.Species == "Cl").Sum(n => lj.Energy((x - n.Position).Norm));
        double coulomb = EwaldField.Create(Salt, charges).PotentialInVolts(x, 0);
        Assert.Equal(pairs + coulomb, site.Energy(x), 2e-4);
        Assert.NotNull(site.Field);
        Assert.Throws<ArgumentException>(() => new StructureSiteBuilder(Salt).MovingAtom("K1"));
        Assert.Throws<ArgumentException>(() => new StructureSiteBuilder(Salt).Pair("K", PairForm.None));
        Assert.Throws<InvalidOperationException>(() => new StructureSiteBuilder(Salt).MovingAtom(0).Build());
    }
}
