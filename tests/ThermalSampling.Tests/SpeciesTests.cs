using System;
using System.Collections.Generic;
using System.Linq;
using ThermalSampling.Analysis;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Sampling;
using ThermalSampling.Units;
using Xunit;

namespace ThermalSampling.Tests;

/// <summary>Sites of several species, each with its own pair potential (invented parameters).</summary>
public class SpeciesTests
{
    private static readonly LennardJones Strong = LennardJones.FromMinimum(Length.FromAngstroms(3.5), Energy.FromElectronVolts(0.010));
    private static readonly Position[] Cage = [.. LatticeSites.NeighbourCage(LatticeKind.FaceCentredCubic, Length.FromAngstroms(3.5))];
    private static readonly Position[] Outer = [new(3.6, 3.6, 0.1), new(-3.6, 3.6, -0.1), new(3.6, -3.6, 0.2), new(-3.6, -3.6, -0.2)];

    /// <summary>
    /// A two-species cage whose second species has no short-range term (PairForm.None) is the one-species cage of the
    /// first, to the last bit: the same energies, harmonic tensor and sampled report (the empty species' sites add zeros),
    /// at any lane width.
    /// </summary>
    [Fact]
    public void A_species_with_no_pair_term_leaves_the_one_species_cage_unchanged()
    {
        var one = SiteLandscape.Create(PairForm.From(Strong), Cage, Position.Origin, Confinement.Sphere(Length.FromAngstroms(1.0)));
        var two = SiteLandscape.CreateWithSpecies([.. Outer.Select(p => (p, "B")), .. Cage.Select(p => (p, "A"))],
            new Dictionary<string, PairForm> { ["A"] = PairForm.From(Strong), ["B"] = PairForm.None }, Position.Origin, Confinement.Sphere(Length.FromAngstroms(1.0)));
        Assert.Equal(["B", "A"], two.SiteSpecies.Distinct());
        foreach (var p in new[] { new Position(0.1, 0.2, -0.3), new Position(0.5, 0, 0), Position.Origin })
        {
            Assert.Equal(one.Energy(p), two.Energy(p));
        }
        var t = Temperature.FromKelvin(30);
        var mass = Mass.FromAtomicMassUnits(40);
        Assert.Equal(SiteAnalysis.Harmonic(one, mass, t).ClassicalCovariance, SiteAnalysis.Harmonic(two, mass, t).ClassicalCovariance);
        foreach (int? lanes in new int?[] { 1, 4, null })
        {
            var settings = new SamplingSettings { Seed = 4, Chains = 3, SamplesPerChain = 5_000, BurnIn = 1_000, ChainsPerVector = lanes };
            Assert.Equal(SiteSampler.Run(one, mass, t, settings).MeanSquareDisplacement, SiteSampler.Run(two, mass, t, settings).MeanSquareDisplacement);
        }
        Assert.Contains("4 × B: no short-range term", two.Description);
    }

    /// <summary>
    /// Two species with different forms (Lennard-Jones and Buckingham) at once: the landscape's energy is the sum of each
    /// species' terms (hand sum), and a species missing from the table is refused by name.
    /// </summary>
    [Fact]
    public void Different_forms_per_species_sum_and_a_missing_species_is_named()
    {
        var buck = new Buckingham(Energy.FromElectronVolts(1000), Length.FromAngstroms(0.3), 5.0);
        var two = SiteLandscape.CreateWithSpecies([.. Cage.Select(p => (p, "A")), .. Outer.Select(p => (p, "C"))],
            new Dictionary<string, PairForm> { ["A"] = PairForm.From(Strong), ["C"] = PairForm.From(buck) }, Position.Origin, Confinement.Sphere(Length.FromAngstroms(1.0)));
        var x = new Position(0.2, -0.1, 0.05);
        double hand = Cage.Sum(s => Strong.Energy((x - s).Norm)) + Outer.Sum(s => buck.Energy((x - s).Norm));
        Assert.Equal(hand, two.Energy(x), 1e-12 * Math.Abs(hand));
        var ex = Assert.Throws<ArgumentException>(() => SiteLandscape.CreateWithSpecies([.. Cage.Select(p => (p, "A")), (Outer[0], "K")],
            new Dictionary<string, PairForm> { ["A"] = PairForm.From(Strong) }, Position.Origin, Confinement.Sphere(Length.FromAngstroms(1.0))));
        Assert.Contains("no entry for species K", ex.Message);
    }

    /// <summary>Lorentz–Berthelot mixing against hand values: σ_ij = (σ_i + σ_j)/2, ε_ij = √(ε_i ε_j) (Lorentz 1881; Berthelot 1898).</summary>
    [Fact]
    public void Lorentz_Berthelot_mixing_matches_hand_values()
    {
        var a = LennardJones.FromSigmaEpsilon(Length.FromAngstroms(3.0), Energy.FromElectronVolts(0.010));
        var b = LennardJones.FromSigmaEpsilon(Length.FromAngstroms(4.0), Energy.FromElectronVolts(0.040));
        var mixed = MixingRules.LorentzBerthelot(a, b);
        Assert.Equal(3.5, mixed.SigmaInAngstroms, 12);
        Assert.Equal(0.020, mixed.EpsilonInElectronVolts, 15);
    }

    /// <summary>The geometric rules against hand values (common practice, no source): Buckingham √(A_i A_j), (ρ_i + ρ_j)/2, √(C_i C_j); Morse √(D_i D_j), (a_i + a_j)/2, (r_i + r_j)/2.</summary>
    [Fact]
    public void Geometric_mixing_matches_hand_values()
    {
        var b = MixingRules.Geometric(new Buckingham(Energy.FromElectronVolts(1000), Length.FromAngstroms(0.3), 4), new Buckingham(Energy.FromElectronVolts(4000), Length.FromAngstroms(0.2), 25));
        Assert.Equal(2000, b.RepulsionPrefactorInElectronVolts, 9);
        Assert.Equal(0.25, b.RhoInAngstroms, 12);
        Assert.Equal(10, b.DispersionElectronVoltAngstrom6, 12);
        var m = MixingRules.Geometric(new Morse(Energy.FromElectronVolts(0.1), 1.0, Length.FromAngstroms(2.0)), new Morse(Energy.FromElectronVolts(0.4), 2.0, Length.FromAngstroms(3.0)));
        Assert.Equal(0.2, m.WellDepthInElectronVolts, 12);
        Assert.Equal(1.5, m.WidthPerAngstrom, 12);
        Assert.Equal(2.5, m.EquilibriumDistanceInAngstroms, 12);
    }

    /// <summary>
    /// The site symmetry respects species: the fcc cage is Oh with one species, but with its twelve neighbours split into
    /// two species in alternating (001) layers the operations that swap the layers are lost and the group is D4h.
    /// </summary>
    [Fact]
    public void Site_symmetry_maps_each_species_onto_itself()
    {
        var one = SiteLandscape.Create(Strong, Cage, Position.Origin, Confinement.Sphere(Length.FromAngstroms(1.0)));
        Assert.Equal("Oh", SiteSymmetry.Find(one, Position.Origin).PointGroup);
        var layered = SiteLandscape.CreateWithSpecies(Cage.Select(p => (p, Math.Abs(p.Z) < 1e-9 ? "A" : "B")),
            new Dictionary<string, LennardJones> { ["A"] = Strong, ["B"] = LennardJones.FromMinimum(Length.FromAngstroms(3.5), Energy.FromElectronVolts(0.020)) },
            Position.Origin, Confinement.Sphere(Length.FromAngstroms(1.0)));
        Assert.Equal("D4h", SiteSymmetry.Find(layered, Position.Origin).PointGroup);
    }
}
