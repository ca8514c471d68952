using System.Linq;
using ThermalSampling.Landscapes;

namespace ThermalSampling.Tests;

/// <summary>Invented structures several test classes share (round, made-up numbers; not real compounds).</summary>
internal static class InventedStructures
{
    /// <summary>A rock-salt-like crystal as CIF: cubic cell 5.0 Å, the fcc centring operations, sites Na1 (Na) at the origin and Cl1 (Cl) at the body centre.</summary>
    internal const string RockSaltCif = """
        data_invented_rocksalt
        _cell_length_a    5.0
        _cell_length_b    5.0
        _cell_length_c    5.0
        _cell_angle_alpha 90
        _cell_angle_beta  90
        _cell_angle_gamma 90
        loop_
        _space_group_symop_operation_xyz
        'x, y, z'
        'x, y+1/2, z+1/2'
        'x+1/2, y, z+1/2'
        'x+1/2, y+1/2, z'
        loop_
        _atom_site_label
        _atom_site_type_symbol
        _atom_site_fract_x
        _atom_site_fract_y
        _atom_site_fract_z
        Na1 Na 0.0 0.0 0.0
        Cl1 Cl 0.5 0.5 0.5
        """;

    /// <summary>The same crystal built directly: the eight atoms of the cubic cell (a = 5 Å) with their site labels.</summary>
    internal static readonly Structure RockSalt = new(
        [.. new (string S, double X, double Y, double Z, string L)[] { ("Na", 0, 0, 0, "Na1"), ("Na", 0, 0.5, 0.5, "Na1"), ("Na", 0.5, 0, 0.5, "Na1"), ("Na", 0.5, 0.5, 0, "Na1"),
            ("Cl", 0.5, 0, 0, "Cl1"), ("Cl", 0, 0.5, 0, "Cl1"), ("Cl", 0, 0, 0.5, "Cl1"), ("Cl", 0.5, 0.5, 0.5, "Cl1") }
            .Select(f => new StructureAtom(f.S, new Position(5.0 * f.X, 5.0 * f.Y, 5.0 * f.Z), f.L))],
        [new Position(5, 0, 0), new Position(0, 5, 0), new Position(0, 0, 5)], "invented rock-salt-like cell, a = 5 Å");
}
