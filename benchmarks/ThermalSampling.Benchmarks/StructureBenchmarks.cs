using System.Globalization;
using System.IO;
using System.Linq;
using System.Text;
using BenchmarkDotNet.Attributes;
using ThermalSampling.Landscapes;
using ThermalSampling.Units;

namespace ThermalSampling.Benchmarks;

/// <summary>
/// Reading and expanding a CIF of 200 atoms in the cell (target: at most 100 ms): an invented cubic cell of 50 sites ×
/// the four fcc centring operations, then the neighbours of one atom within 6 Å with periodic images. Baseline: the
/// same 200 atoms as extended XYZ with the lattice (no operations to apply), in the same run.
/// </summary>
[MemoryDiagnoser]
public class StructureBenchmarks
{
    private string _cif = "", _xyz = "";

    [GlobalSetup]
    public void Setup()
    {
        var c = CultureInfo.InvariantCulture;
        var cif = new StringBuilder("data_invented\n_cell_length_a 12\n_cell_length_b 12\n_cell_length_c 12\n_cell_angle_alpha 90\n_cell_angle_beta 90\n_cell_angle_gamma 90\n");
        cif.Append("loop_\n_space_group_symop_operation_xyz\n'x, y, z'\n'x, y+1/2, z+1/2'\n'x+1/2, y, z+1/2'\n'x+1/2, y+1/2, z'\n");
        cif.Append("loop_\n_atom_site_label\n_atom_site_type_symbol\n_atom_site_fract_x\n_atom_site_fract_y\n_atom_site_fract_z\n");
        // 50 sites in the primitive quarter (x, y, z < 1/2 with x + y + z kept apart from its centring images).
        var sites = Enumerable.Range(0, 50).Select(i => (0.02 + 0.45 * ((i * 7) % 50) / 50.0, 0.02 + 0.45 * ((i * 13) % 50) / 50.0, 0.02 + 0.11 * (i % 4))).ToList();
        for (int i = 0; i < sites.Count; i++)
        {
            cif.Append(string.Format(c, "A{0} {1} {2:F5} {3:F5} {4:F5}\n", i + 1, i % 2 == 0 ? "A" : "B", sites[i].Item1, sites[i].Item2, sites[i].Item3));
        }
        _cif = cif.ToString();
        var structure = CifReader.Read(new StringReader(_cif), "bench.cif");
        var xyz = new StringBuilder(string.Format(c, "{0}\nLattice=\"12 0 0 0 12 0 0 0 12\" invented\n", structure.Atoms.Length));
        foreach (var a in structure.Atoms)
        {
            xyz.Append(string.Format(c, "{0} {1:R} {2:R} {3:R}\n", a.Species, a.Position.X, a.Position.Y, a.Position.Z));
        }
        _xyz = xyz.ToString();
    }

    /// <summary>The XYZ of the expanded cell, and the neighbours of atom 1.</summary>
    [Benchmark(Baseline = true)]
    public int ReadXyzAndNeighbours() => StructureFiles.ReadXyz(new StringReader(_xyz), "bench.xyz").NeighboursOf(0, Length.FromAngstroms(6)).Length;

    /// <summary>The CIF read and expanded by its operations (200 atoms), and the neighbours of atom 1.</summary>
    [Benchmark]
    public int ReadCifExpandAndNeighbours() => CifReader.Read(new StringReader(_cif), "bench.cif").NeighboursOf(0, Length.FromAngstroms(6)).Length;
}
