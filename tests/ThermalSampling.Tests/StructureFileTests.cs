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
