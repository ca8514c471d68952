using System;
using System.IO;
using System.Linq;
using ThermalSampling.Landscapes;
using ThermalSampling.Units;
using Xunit;

namespace ThermalSampling.Tests;

/// <summary>
/// One invented rock-salt-like crystal (cubic cell 5.0 Å, Na and Cl) written four ways: a CIF with the fcc centring
/// operations and the origin on Na; the same with the origin shifted by (¼, ¼, ¼); a CIF in P1 listing all eight atoms;
/// and an extended XYZ with the lattice. The Na site's neighbours within 5.1 Å (species, distance and direction) are the
/// same every way: 6 Cl at 2.5 Å, 12 Na at 3.54 Å, 8 Cl at 4.33 Å, 6 Na at 5.0 Å (facts of the rock-salt geometry).
/// </summary>
public class StructureSettingTests
{
    private static string Cif(string operations, string sites) => $$"""
        data_invented_rocksalt
        _cell_length_a    5.0
        _cell_length_b    5.0
        _cell_length_c    5.0
        _cell_angle_alpha 90
        _cell_angle_beta  90
        _cell_angle_gamma 90
        loop_
        _space_group_symop_operation_xyz
        {{operations}}
        loop_
        _atom_site_label
        _atom_site_type_symbol
        _atom_site_fract_x
        _atom_site_fract_y
        _atom_site_fract_z
        {{sites}}
        """;

    private const string Centring = "'x, y, z'\n'x, y+1/2, z+1/2'\n'x+1/2, y, z+1/2'\n'x+1/2, y+1/2, z'";

    private static (string Species, double Distance, double X, double Y, double Z)[] Shells(Structure s)
    {
        int na = s.Atoms.ToList().FindIndex(a => a.Species == "Na");
        var home = s.Atoms[na].Position;
        return [.. s.NeighboursOf(na, Length.FromAngstroms(5.1))
            .Select(n => (n.Species, Math.Round((n.Position - home).Norm, 9), Math.Round((n.Position - home).X, 9), Math.Round((n.Position - home).Y, 9), Math.Round((n.Position - home).Z, 9)))
            .OrderBy(t => t.Item2).ThenBy(t => t.Item3).ThenBy(t => t.Item4).ThenBy(t => t.Item5)];
    }

    [Fact]
    public void Every_setting_and_format_gives_the_same_site()
    {
        var centred = CifReader.Read(new StringReader(Cif(Centring, "Na1 Na 0 0 0\nCl1 Cl 0.5 0.5 0.5")), "centred.cif");
        var shifted = CifReader.Read(new StringReader(Cif(Centring, "Na1 Na 0.25 0.25 0.25\nCl1 Cl 0.75 0.75 0.75")), "shifted.cif");
        string p1Sites = string.Join("\n", new[] { (0.0, 0.0, 0.0), (0, 0.5, 0.5), (0.5, 0, 0.5), (0.5, 0.5, 0) }
            .SelectMany((f, i) => new[] { $"Na{i + 1} Na {f.Item1} {f.Item2} {f.Item3}", $"Cl{i + 1} Cl {(f.Item1 + 0.5) % 1} {(f.Item2 + 0.5) % 1} {(f.Item3 + 0.5) % 1}" }));
        var p1 = CifReader.Read(new StringReader(Cif("'x, y, z'", p1Sites)), "p1.cif");
        string xyzAtoms = string.Join("\n", centred.Atoms.Select(a => FormattableString.Invariant($"{a.Species} {a.Position.X} {a.Position.Y} {a.Position.Z}")));
        var xyz = StructureFiles.ReadXyz(new StringReader($"{centred.Atoms.Length}\nLattice=\"5 0 0 0 5 0 0 0 5\" invented rock-salt-like cell\n{xyzAtoms}\n"), "cell.xyz");
        var reference = Shells(centred);
        Assert.Equal(32, reference.Length);
        Assert.Equal(6, reference.Count(n => n.Species == "Cl" && Math.Abs(n.Distance - 2.5) < 1e-9));
        Assert.Equal(12, reference.Count(n => n.Species == "Na" && Math.Abs(n.Distance - 2.5 * Math.Sqrt(2)) < 1e-9));
        Assert.Equal(8, reference.Count(n => n.Species == "Cl" && Math.Abs(n.Distance - 2.5 * Math.Sqrt(3)) < 1e-9));
        Assert.Equal(6, reference.Count(n => n.Species == "Na" && Math.Abs(n.Distance - 5.0) < 1e-9));
        Assert.Equal(reference, Shells(shifted));
        Assert.Equal(reference, Shells(p1));
        Assert.Equal(reference, Shells(xyz));
    }
}

/// <summary>The structure readers against the built-in lattice builder.</summary>
public class StructureAgainstLatticeTests
{
    /// <summary>
    /// An invented fcc metal written by hand as a CIF (one site, the four centring operations; nearest-neighbour distance
    /// 3.5 Å) gives the same first two neighbour shells, position by position, as LatticeSites.NeighbourCage (12 at 3.5 Å,
    /// then 6 at 4.95 Å).
    /// </summary>
    [Fact]
    public void A_hand_written_fcc_cif_gives_the_lattice_builders_shells()
    {
        double a = 3.5 * Math.Sqrt(2);
        string cif = FormattableString.Invariant($"data_invented_fcc\n_cell_length_a {a:R}\n_cell_length_b {a:R}\n_cell_length_c {a:R}\n_cell_angle_alpha 90\n_cell_angle_beta 90\n_cell_angle_gamma 90\n")
            + "loop_\n_space_group_symop_operation_xyz\n'x, y, z'\n'x, y+1/2, z+1/2'\n'x+1/2, y, z+1/2'\n'x+1/2, y+1/2, z'\n"
            + "loop_\n_atom_site_label\n_atom_site_type_symbol\n_atom_site_fract_x\n_atom_site_fract_y\n_atom_site_fract_z\nM1 M 0 0 0\n";
        var structure = CifReader.Read(new StringReader(cif), "fcc.cif");
        static string Key(Position p) => FormattableString.Invariant($"{Math.Round(p.X, 6) + 0.0},{Math.Round(p.Y, 6) + 0.0},{Math.Round(p.Z, 6) + 0.0}"); // + 0.0 turns −0 into 0
        var fromCif = structure.NeighboursOf(0, Length.FromAngstroms(5.0)).Select(n => Key(n.Position - structure.Atoms[0].Position)).Order().ToList();
        var built = LatticeSites.NeighbourCage(LatticeKind.FaceCentredCubic, Length.FromAngstroms(3.5), 2).Select(Key).Order().ToList();
        Assert.Equal(18, built.Count);
        Assert.Equal(built, fromCif);
    }
}
