using System;
using System.IO;
using ThermalSampling.Landscapes;
using Xunit;

namespace ThermalSampling.Tests;

/// <summary>
/// A corpus of malformed CIF and XYZ files (invented): each is refused with a StructureFormatException that names the
/// line and says what is wrong, never a crash or a silent structure.
/// </summary>
public class MalformedStructureTests
{
    private const string Cell = "data_x\n_cell_length_a 5\n_cell_length_b 5\n_cell_length_c 5\n_cell_angle_alpha 90\n_cell_angle_beta 90\n_cell_angle_gamma 90\n";
    private const string Ops = "loop_\n_space_group_symop_operation_xyz\n'x, y, z'\n";
    private const string SiteHead = "loop_\n_atom_site_label\n_atom_site_type_symbol\n_atom_site_fract_x\n_atom_site_fract_y\n_atom_site_fract_z\n";

    public static TheoryData<string, string, int, string> Corpus => new()
    {
        // CIF
        { "cif", Cell + Ops + SiteHead + "Na1 Na 0 0 0\n;\nnever closed\n", 18, "a text field opened with ';' is never closed" },
        { "cif", Cell + "stray\n" + Ops + SiteHead + "Na1 Na 0 0 0\n", 8, "'stray' is a value without a tag or a loop" },
        { "cif", Cell.Replace("_cell_length_b 5\n", "", StringComparison.Ordinal) + Ops + SiteHead + "Na1 Na 0 0 0\n", 0, "the file gives no _cell_length_b" },
        { "cif", Cell.Replace("_cell_angle_gamma 90", "_cell_angle_gamma 180", StringComparison.Ordinal) + Ops + SiteHead + "Na1 Na 0 0 0\n", 0, "do not make a cell with volume" },
        { "cif", Cell + "_symmetry_space_group_name_H-M 'F m -3 m'\n" + SiteHead + "Na1 Na 0 0 0\n", 0, "the file lists no symmetry operations" },
        { "cif", Cell + Ops, 0, "the file lists no atom sites" },
        { "cif", Cell + Ops + "loop_\n_atom_site_label\n_atom_site_fract_x\n_atom_site_fract_y\nNa1 0 0\n", 0, "the atom-site loop needs _atom_site_label and _atom_site_fract_x, _y and _z" },
        { "cif", Cell + Ops + SiteHead + "Na1 Na 0 0 0\nCl1 Cl 0.5 0.5\n", 0, "not a whole number of rows of 5" },
        { "cif", Cell + Ops + SiteHead.Replace("_atom_site_fract_z\n", "_atom_site_fract_z\n_atom_site_occupancy\n", StringComparison.Ordinal) + "Na1 Na 0 0 0 0.5\n", 0, "partial occupancy (disorder) is not averaged" },
        { "cif", Cell + Ops + SiteHead + "Na1 Na zero 0 0\n", 0, "_atom_site_fract_x 'zero' is not a number" },
        { "cif", Cell.Replace("_cell_length_a 5", "_cell_length_a five", StringComparison.Ordinal) + Ops + SiteHead + "Na1 Na 0 0 0\n", 2, "_cell_length_a 'five' is not a number" },
        { "cif", Cell + "loop_\n_space_group_symop_operation_xyz\n'x, y'\n" + SiteHead + "Na1 Na 0 0 0\n", 10, "does not have three comma-separated parts" },
        { "cif", Cell + "loop_\n_space_group_symop_operation_xyz\n'x, y, w'\n" + SiteHead + "Na1 Na 0 0 0\n", 10, "has a term 'w' that is neither" },
        { "cif", Cell + "loop_\n_space_group_symop_operation_xyz\n'x, y, z\n" + SiteHead + "Na1 Na 0 0 0\n", 10, "is not closed on its line" },
        // XYZ
        { "xyz", "two\ncomment\nAr 0 0 0\n", 1, "the first line must be the number of atoms" },
        { "xyz", "0\ncomment\n", 1, "the first line must be the number of atoms" },
        { "xyz", "1\n", 2, "the file ends before the comment line" },
        { "xyz", "1\nLattice=\"5 0 0 0 5 0 0 0\"\nAr 0 0 0\n", 2, "must hold nine finite numbers" },
        { "xyz", "1\nLattice=\"5 0 0 0 5 0 5 0 0\"\nAr 0 0 0\n", 2, "are coplanar" },
        { "xyz", "3\ncomment\nAr 0 0 0\nAr 1 0 0\n", 5, "the file ends after 2 of the 3 atoms" },
        { "xyz", "2\ncomment\nAr 0 0 0\nAr 1 0\n", 4, "an atom line needs a label and three coordinates" },
        { "xyz", "1\ncomment\nAr 0 nan 0\n", 3, "coordinate y 'nan' is not a finite number" },
        { "xyz", "1\ncomment\nAr 0 0 1e9\n", 3, "coordinate z '1e9' is not a finite number of at most 1e6" },
    };

    /// <summary>Each malformed file gets its own message naming its line (0: any line; the test then only checks the message).</summary>
    [Theory]
    [MemberData(nameof(Corpus))]
    public void Each_malformed_file_is_refused_naming_the_line(string kind, string text, int line, string message)
    {
        var ex = Assert.Throws<StructureFormatException>(() => kind == "cif"
            ? CifReader.Read(new StringReader(text), "bad.cif")
            : StructureFiles.ReadXyz(new StringReader(text), "bad.xyz"));
        Assert.Contains(message, ex.Message);
        Assert.True(ex.Line >= 1, ex.Message);
        if (line > 0)
        {
            Assert.Equal(line, ex.Line);
        }
        Assert.StartsWith($"bad.{kind}, line {ex.Line}: ", ex.Message);
    }
}
