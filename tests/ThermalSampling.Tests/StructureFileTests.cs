using System;
using System.IO;
using System.Linq;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Units;
using Xunit;

namespace ThermalSampling.Tests;

/// <summary>Structure files (XYZ, plain and extended) and the neighbours of an atom built from them.</summary>
public class StructureFileTests
{
    private static Structure Read(string text) => StructureFiles.ReadXyz(new StringReader(text), "test.xyz");

    /// <summary>
    /// An fcc crystal given as its conventional cubic cell (an extended XYZ file: 4 atoms, Lattice of edge √2·3.5 Å): every
    /// atom has 12 nearest neighbours at 3.5 Å and 6 next at 4.95 Å (a fact of the trade), periodic images included, and
    /// the site landscape built from the 12 has the energy of the built-in fcc cage, to 1e-12, at any point.
    /// </summary>
    [Fact]
    public void A_periodic_fcc_cell_gives_the_fcc_cage()
    {
        double a = Math.Sqrt(2) * 3.5;
        string xyz = $"4\nLattice=\"{a} 0 0 0 {a} 0 0 0 {a}\" Properties=species:S:1:pos:R:3 (invented)\nAr 0 0 0\nAr {a / 2} {a / 2} 0\nAr {a / 2} 0 {a / 2}\nAr 0 {a / 2} {a / 2}\n";
        var structure = Read(xyz);
        Assert.True(structure.IsPeriodic);
        var shell = structure.NeighboursOf(0, Length.FromAngstroms(3.6));
        Assert.Equal(12, shell.Length);
        Assert.All(shell, n => Assert.Equal(3.5, n.Position.Norm, 9));
        Assert.Equal(18, structure.NeighboursOf(2, Length.FromAngstroms(5.0)).Length);
        var pair = InventedLandscapes.Pair;
        var fromFile = SiteLandscape.Create(pair, shell.Select(n => n.Position), Position.Origin, Confinement.Sphere(Length.FromAngstroms(1.2)));
        foreach (var p in new[] { Position.Origin, new Position(0.1, -0.2, 0.05), new Position(0.3, 0.3, 0.3) })
        {
            Assert.Equal(InventedLandscapes.Cage.Energy(p), fromFile.Energy(p), 12);
        }
    }

    /// <summary>A plain XYZ cluster has no images: the neighbours are the other atoms within the cutoff, nearest first.</summary>
    [Fact]
    public void A_cluster_has_no_periodic_images()
    {
        var structure = Read("3\ninvented cluster\nC 0 0 0\nO 1.2 0 0\nH 0 2.5 0\n");
        Assert.False(structure.IsPeriodic);
        var near = structure.NeighboursOf(0, Length.FromAngstroms(3));
        Assert.Equal(["O", "H"], near.Select(n => n.Species));
        Assert.Single(structure.NeighboursOf(0, Length.FromAngstroms(2)));
        Assert.Equal("index", Assert.Throws<ArgumentOutOfRangeException>(() => structure.NeighboursOf(3, Length.FromAngstroms(2))).ParamName);
        Assert.Equal("cutoff", Assert.Throws<ArgumentOutOfRangeException>(() => structure.NeighboursOf(0, Length.FromAngstroms(0))).ParamName);
    }

    /// <summary>Malformed files are refused with the file, the line and what is wrong; disorder (two atoms on one site) is refused, not averaged.</summary>
    [Theory]
    [InlineData("x\ncomment\n", 1, "the first line must be the number of atoms")]
    [InlineData("2\ncomment\nAr 0 0 0\n", 4, "the file ends after 1 of the 2 atoms")]
    [InlineData("1\ncomment\nAr 0 zero 0\n", 3, "coordinate y 'zero' is not a finite number")]
    [InlineData("1\ncomment\nAr 0 0\n", 3, "an atom line needs a label and three coordinates")]
    [InlineData("1\nLattice=\"1 0 0 0 1 0\"\nAr 0 0 0\n", 2, "must hold nine finite numbers")]
    [InlineData("1\nLattice=\"1 0 0 0 1 0 1 1 0\"\nAr 0 0 0\n", 2, "coplanar")]
    [InlineData("2\ncomment\nAr 0 0 0\nAr 0.01 0 0\n", 4, "two atoms on one site")]
    public void Malformed_files_name_the_line_and_the_problem(string text, int line, string problem)
    {
        var ex = Assert.Throws<StructureFormatException>(() => Read(text));
        Assert.Equal(line, ex.Line);
        Assert.Equal("test.xyz", ex.File);
        Assert.StartsWith($"test.xyz, line {line}: ", ex.Message);
        Assert.Contains(problem, ex.Message);
    }
}

/// <summary>CIF files: the cell, the symmetry operations and the atom sites, expanded into the whole cell.</summary>
public class CifReaderTests
{
    private static string FccCif(string operations, string occupancy = "1.0") => $$"""
        data_invented_fcc
        # an invented argon-like fcc crystal (edge √2·3.5 Å), for the test only
        _cell_length_a    4.94975(3)
        _cell_length_b    4.94975(3)
        _cell_length_c    4.94975(3)
        _cell_angle_alpha 90
        _cell_angle_beta  90
        _cell_angle_gamma 90
        _symmetry_space_group_name_H-M 'F m -3 m'
        {{operations}}
        loop_
        _atom_site_label
        _atom_site_type_symbol
        _atom_site_fract_x
        _atom_site_fract_y
        _atom_site_fract_z
        _atom_site_occupancy
        Ar1 Ar 0.0 0.0 0.0 {{occupancy}}
        """;

    private const string Centring = """
        loop_
        _space_group_symop_id
        _space_group_symop_operation_xyz
        1 'x, y, z'
        2 'x, y+1/2, z+1/2'
        3 'x+1/2, y, z+1/2'
        4 '1/2+x, 1/2+y, z'
        """;

    /// <summary>
    /// One atom site expanded by the four centring operations of an fcc cell gives the four atoms of the cubic cell, and
    /// each has 12 nearest neighbours at a/√2 = 3.5 Å (a fact of the trade); the standard uncertainty in "4.94975(3)" is dropped.
    /// </summary>
    [Fact]
    public void Centring_operations_expand_one_site_into_the_fcc_cell()
    {
        var s = CifReader.Read(new StringReader(FccCif(Centring)), "test.cif");
        Assert.Equal(4, s.Atoms.Length);
        Assert.All(s.Atoms, atom => Assert.Equal("Ar", atom.Species));
        var shell = s.NeighboursOf(3, Length.FromAngstroms(3.6));
        Assert.Equal(12, shell.Length);
        Assert.All(shell, n => Assert.Equal(3.5, (n.Position - s.Atoms[3].Position).Norm, 4));
    }

    /// <summary>A hexagonal cell (a = b = 3, c = 5 Å, γ = 120°, invented) is set with a along x and b in the xy plane: |b| = 3, a·b = −4.5, c along z.</summary>
    [Fact]
    public void The_cell_is_set_in_cartesian_axes()
    {
        string cif = "data_x\n_cell_length_a 3\n_cell_length_b 3\n_cell_length_c 5\n_cell_angle_alpha 90\n_cell_angle_beta 90\n_cell_angle_gamma 120\n"
            + "_symmetry_equiv_pos_as_xyz 'x,y,z'\nloop_\n_atom_site_label\n_atom_site_fract_x\n_atom_site_fract_y\n_atom_site_fract_z\nC1 0 0 0\n";
        var s = CifReader.Read(new StringReader(cif), "hex.cif");
        var (a, b, c) = (s.Lattice[0], s.Lattice[1], s.Lattice[2]);
        Assert.Equal(3, b.Norm, 12);
        Assert.Equal(-4.5, a.X * b.X + a.Y * b.Y + a.Z * b.Z, 12);
        Assert.Equal(5, c.Z, 12);
        Assert.Equal("C1", s.Atoms[0].Species); // no type symbol: the label
    }

    /// <summary>
    /// Text fields (<c>;</c> … <c>;</c>) as a tag's value, as real files carry a title or a chemical name, are read whole
    /// and do not disturb what follows; a value may stand on a later line after blank and comment lines.
    /// </summary>
    [Fact]
    public void Text_fields_and_values_on_later_lines_are_read()
    {
        string head = """
            _publ_section_title
            ;
             An invented fcc crystal: 'quoted' words; loop_ and _tags inside
             are prose, not syntax
            ;
            _chemical_name_common
            # a comment between a tag and its value

              'invented argon'
            """;
        var plain = CifReader.Read(new StringReader(FccCif(Centring)), "test.cif");
        var withText = CifReader.Read(new StringReader(FccCif(Centring).Replace("_cell_angle_gamma 90", "_cell_angle_gamma\n;90\n;\n" + head, StringComparison.Ordinal)), "test.cif");
        Assert.Equal(plain.Atoms.Length, withText.Atoms.Length);
        Assert.Equal(plain.Atoms.Select(a => a.Position), withText.Atoms.Select(a => a.Position));
        Assert.Equal(plain.Lattice.ToArray(), withText.Lattice.ToArray());
    }

    /// <summary>A tag without a value (at the end of the file, or followed by another tag) is refused, naming the tag and its line.</summary>
    [Theory]
    [InlineData("_journal_volume\n", 25, "the tag _journal_volume has no value: the file ends after it")]
    [InlineData("_journal_volume\n_journal_year 2026\n", 25, "the tag _journal_volume has no value of its own (line 26 holds '_journal_year 2026')")]
    [InlineData("_journal_volume\n;\nnever closed\n", 26, "a text field opened with ';' is never closed")]
    public void A_tag_without_a_value_is_refused(string tail, int line, string problem)
    {
        var ex = Assert.Throws<StructureFormatException>(() => CifReader.Read(new StringReader(FccCif(Centring) + "\n" + tail), "test.cif"));
        Assert.StartsWith($"test.cif, line {line}: {problem}", ex.Message);
    }

    /// <summary>A file without symmetry operations (a space-group name alone) and a partial occupancy are refused, naming what is missing or wrong.</summary>
    [Fact]
    public void Missing_operations_and_disorder_are_refused()
    {
        var missing = Assert.Throws<StructureFormatException>(() => CifReader.Read(new StringReader(FccCif("")), "test.cif"));
        Assert.Contains("no symmetry operations", missing.Message);
        Assert.Contains("a space-group name alone is not enough", missing.Message);
        var disorder = Assert.Throws<StructureFormatException>(() => CifReader.Read(new StringReader(FccCif(Centring, "0.5")), "test.cif"));
        Assert.Contains("atom Ar1 has occupancy 0.5", disorder.Message);
        Assert.Contains("test.cif, line", disorder.Message);
        var badOp = Assert.Throws<StructureFormatException>(() => CifReader.Read(new StringReader(FccCif("_symmetry_equiv_pos_as_xyz 'x,y,w'")), "test.cif"));
        Assert.Contains("neither ±x, ±y, ±z nor a number", badOp.Message);
    }
}
