using System;
using System.Collections.Generic;
using System.Globalization;
using System.Linq;
using ThermalSampling.Internal;
using ThermalSampling.Potentials;
using ThermalSampling.Units;

namespace ThermalSampling.Landscapes;

/// <summary>
/// A site landscape from a structure, step by step, as a scenario's structure landscape builds it: the moving atom (by
/// label or index), the cutoff for its neighbours (periodic images included), each neighbour species' pair potential
/// with the moving atom (a species without one has no short-range term and is left out), optional charges (the Coulomb
/// term: the moving ion in the Ewald field of the whole neutral crystal), and the confinement.
/// </summary>
/// <example>
/// <code>
/// var site = new StructureSiteBuilder(structure).MovingAtom("G1").Cutoff(Length.FromAngstroms(6.5))
///     .Pair("B", PairForm.From(lj)).Charges(new Dictionary&lt;string, double&gt; { ["G"] = 1, ["B"] = -0.5, ["A"] = 0.5 })
///     .Confinement(Confinement.Sphere(Length.FromAngstroms(1.5))).Build();
/// </code>
/// </example>
public sealed class StructureSiteBuilder
{
    private readonly Structure _structure;
    private readonly Dictionary<string, PairForm> _pairs = new(StringComparer.Ordinal);
    private int? _atom;
    private double? _cutoff;
    private IReadOnlyDictionary<string, double>? _charges;
    private Confinement? _confinement;
    private string? _rule;

    /// <param name="structure">The structure (from <see cref="CifReader"/> or <see cref="StructureFiles"/>).</param>
    public StructureSiteBuilder(Structure structure) => _structure = Preconditions.CheckNotNull(structure, nameof(structure));

    /// <summary>The moving atom: a CIF atom-site label, else a species label (its first atom).</summary>
    /// <param name="label">The label.</param>
    public StructureSiteBuilder MovingAtom(string label)
    {
        Preconditions.CheckNotNull(label, nameof(label));
        int found = _structure.Atoms.ToList().FindIndex(a => a.Label == label);
        found = found >= 0 ? found : _structure.Atoms.ToList().FindIndex(a => a.Species == label);
        if (found < 0)
        {
            throw new ArgumentException($"label '{label}' is not an atom of the structure (its atoms: {string.Join(", ", _structure.Atoms.Select(a => a.Label ?? a.Species).Distinct().Take(12))}).", nameof(label));
        }
        _atom = found;
        return this;
    }

    /// <summary>The moving atom by its index in <see cref="Structure.Atoms"/> (from 0).</summary>
    /// <param name="index">The index.</param>
    public StructureSiteBuilder MovingAtom(int index)
    {
        if (index < 0 || index >= _structure.Atoms.Length)
        {
            throw new ArgumentOutOfRangeException(nameof(index), index, $"index must be from 0 to {_structure.Atoms.Length - 1}.");
        }
        _atom = index;
        return this;
    }

    /// <summary>Neighbours within <paramref name="cutoff"/> of the moving atom (periodic images included).</summary>
    /// <param name="cutoff">The cutoff, positive.</param>
    public StructureSiteBuilder Cutoff(Length cutoff)
    {
        _cutoff = Preconditions.CheckPositive(cutoff.InAngstroms, nameof(cutoff));
        return this;
    }

    /// <summary>The pair potential between the moving atom and every neighbour of <paramref name="species"/>.</summary>
    /// <param name="species">A species label present in the structure.</param>
    /// <param name="potential">The pair potential.</param>
    public StructureSiteBuilder Pair(string species, PairForm potential)
    {
        Preconditions.CheckNotNull(species, nameof(species));
        if (!_structure.Atoms.Any(a => a.Species == species))
        {
            throw new ArgumentException($"species '{species}' is not in the structure (its species: {string.Join(", ", _structure.Atoms.Select(a => a.Species).Distinct())}).", nameof(species));
        }
        _pairs[species] = potential;
        return this;
    }

    /// <summary>Names the mixing rule that made the pairs, for reports.</summary>
    /// <param name="rule">The rule's name, such as "Lorentz–Berthelot".</param>
    public StructureSiteBuilder MixingRule(string rule)
    {
        _rule = Preconditions.CheckNotNull(rule, nameof(rule));
        return this;
    }

    /// <summary>The charge of each species, e: adds the Coulomb term (the cell must be neutral).</summary>
    /// <param name="charges">Charges per species label.</param>
    public StructureSiteBuilder Charges(IReadOnlyDictionary<string, double> charges)
    {
        _charges = Preconditions.CheckNotNull(charges, nameof(charges));
        return this;
    }

    /// <summary>The region the moving atom may not leave, about its home.</summary>
    /// <param name="confinement">The confinement.</param>
    public StructureSiteBuilder Confinement(Confinement confinement)
    {
        _confinement = confinement;
        return this;
    }

    /// <summary>The landscape.</summary>
    /// <exception cref="InvalidOperationException">When the moving atom, the cutoff or the confinement is missing, or no neighbour has a pair and there are no charges.</exception>
    public SiteLandscape<PairForm> Build()
    {
        if (_atom is not int atom || _cutoff is not double cutoff || _confinement is not Confinement confinement)
        {
            throw new InvalidOperationException("Give the moving atom, the cutoff and the confinement before Build().");
        }
        var home = _structure.Atoms[atom].Position;
        var acting = _structure.NeighboursOf(atom, Length.FromAngstroms(cutoff)).Where(n => _pairs.ContainsKey(n.Species)).Select(n => (n.Position, n.Species)).ToList();
        if (acting.Count == 0 && _charges is null)
        {
            throw new InvalidOperationException(string.Create(CultureInfo.InvariantCulture,
                $"No neighbour within {cutoff:G4} Å has a pair with the moving atom, and there are no charges: nothing acts on it."));
        }
        var potentials = acting.Select(a => a.Species).Distinct().ToDictionary(s => s, s => _pairs[s], StringComparer.Ordinal);
        var landscape = acting.Count > 0
            ? SiteLandscape.CreateWithSpecies(acting, potentials, home, confinement, _rule)
            : SiteLandscape.Create(PairForm.None, [home + new Position(1e6, 0, 0)], home, confinement); // no pairs: the Coulomb field alone (one far site with no term)
        if (_charges is null)
        {
            return landscape;
        }
        double reach = confinement.Shape == ConfinementShape.Sphere ? confinement.SizeInAngstroms : confinement.SizeInAngstroms * Math.Sqrt(3);
        return landscape.WithField(CoulombSite.Field(_structure, atom, _charges, 1.05 * reach));
    }
}
