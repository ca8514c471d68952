using System;
using System.IO;
using System.Text;
using FsCheck;
using FsCheck.Fluent;
using FsCheck.Xunit;
using ThermalSampling.Landscapes;
using ThermalSampling.Units;

namespace ThermalSampling.Tests;

/// <summary>
/// Bounded, seeded fuzzing of the CIF and XYZ readers, as the scenario reader is fuzzed: random character- and token-level
/// mutations of valid files must either read (and then give neighbours without throwing) or be refused with a
/// StructureFormatException naming a line; never any other exception.
/// </summary>
public class StructureFuzzTests
{
    private const string Cif = InventedStructures.RockSaltCif;

    private const string Xyz = "3\nLattice=\"5 0 0 0 5 0 0 0 5\" invented\nNa 0 0 0\nCl 2.5 0 0\nNa 2.5 2.5 0\n";

    private static readonly string[] Tokens = ["loop_", "_cell_length_a", "'", ";", "\n", "?", ".", "-1e309", "nan", "x,y", "1/0", "_atom_site_label", "\"", "Lattice=\"", "0"];

    private static string Mutate(string valid, int seed, int count)
    {
        var random = Randomness.RandomStream.FromSeed((ulong)seed);
        var text = new StringBuilder(valid);
        for (int k = 0; k < count && text.Length > 0; k++)
        {
            int at = (int)(random.NextUnitInterval() * text.Length);
            switch ((int)(random.NextUnitInterval() * 3))
            {
                case 0:
                    text.Remove(at, Math.Min(1 + (int)(random.NextUnitInterval() * 8), text.Length - at));
                    break;
                case 1:
                    text.Insert(at, Tokens[(int)(random.NextUnitInterval() * Tokens.Length)]);
                    break;
                default:
                    text[at] = (char)(32 + (int)(random.NextUnitInterval() * 95));
                    break;
            }
        }
        return text.ToString();
    }

    private static Arbitrary<(int Seed, int Count)> Mutations() => (from seed in Gen.Choose(0, int.MaxValue) from count in Gen.Choose(1, 6) select (seed, count)).ToArbitrary();

    private static bool ReadsOrIsRefusedByLine(Func<Structure> read)
    {
        try
        {
            var structure = read();
            if (structure.Atoms.Length > 0 && structure.Atoms.Length < 5000)
            {
                _ = structure.NeighboursOf(0, Length.FromAngstroms(3));
            }
            return true;
        }
        catch (StructureFormatException ex)
        {
            return ex.Line >= 1 && ex.Message.Length > 0;
        }
        catch (ArgumentException)
        {
            return true; // a readable file whose cell cannot give neighbours (for example a degenerate lattice) says why by argument
        }
    }

    [Property(MaxTest = 1500, Replay = "(11,13)")]
    public Property Mutated_cif_files_read_or_are_refused_naming_a_line()
        => Prop.ForAll(Mutations(), m => ReadsOrIsRefusedByLine(() => CifReader.Read(new StringReader(Mutate(Cif, m.Seed, m.Count)), "fuzz.cif")));

    [Property(MaxTest = 1500, Replay = "(17,19)")]
    public Property Mutated_xyz_files_read_or_are_refused_naming_a_line()
        => Prop.ForAll(Mutations(), m => ReadsOrIsRefusedByLine(() => StructureFiles.ReadXyz(new StringReader(Mutate(Xyz, m.Seed, m.Count)), "fuzz.xyz")));
}
