using System;
using System.Collections.Generic;
using System.Collections.Immutable;
using System.Globalization;
using System.IO;
using System.Linq;
using System.Text.RegularExpressions;
using ThermalSampling.Internal;

namespace ThermalSampling.Landscapes;

/// <summary>One atom of a structure: its species label (the element symbol or any label) and position, Å.</summary>
/// <param name="Species">The species: an XYZ file's first column, a CIF's type symbol (its site label without one).</param>
/// <param name="Position">Cartesian coordinates, Å.</param>
/// <param name="Label">A CIF atom site's label (shared by the copies the symmetry operations make); null for XYZ.</param>
public readonly record struct StructureAtom(string Species, Position Position, string? Label = null);

/// <summary>
/// Atoms read from a structure file, with the periodic lattice when the file gives one (three cell vectors, Å), and the
/// neighbours of one atom within a cutoff, periodic images included: the fixed atoms of a site landscape.
/// </summary>
/// <param name="Atoms">The atoms in file order.</param>
/// <param name="Lattice">The three cell vectors (rows), Å, or empty for a finite cluster.</param>
/// <param name="Source">Where the structure came from (for messages and reports).</param>
public sealed record Structure(ImmutableArray<StructureAtom> Atoms, ImmutableArray<Position> Lattice, string Source)
{
    /// <summary>Whether the structure is periodic.</summary>
    public bool IsPeriodic => !Lattice.IsEmpty;

    /// <summary>
    /// The atoms within <paramref name="cutoff"/> of atom <paramref name="index"/> (0-based), periodic images included,
    /// the atom itself (at zero distance) excluded, nearest first: the fixed atoms of its site. Images of the atom itself
    /// at other lattice points are real atoms of the crystal and are included.
    /// </summary>
    /// <param name="index">The moving atom, 0-based.</param>
    /// <param name="cutoff">The neighbour cutoff, above 0 and at most 100 Å.</param>
    /// <exception cref="ArgumentOutOfRangeException">An index outside the file, or a cutoff outside its range.</exception>
    public ImmutableArray<StructureAtom> NeighboursOf(int index, Units.Length cutoff)
    {
        if (index < 0 || index >= Atoms.Length)
        {
            throw new ArgumentOutOfRangeException(nameof(index), index, $"{Source} has {Atoms.Length} atoms; the index must lie between 0 and {Atoms.Length - 1}.");
        }
        double rc = cutoff.InAngstroms;
        if (!(rc > 0 && rc <= 100))
        {
            throw new ArgumentOutOfRangeException(nameof(cutoff), rc, "The cutoff must lie above 0 and at most 100 Å.");
        }
        var centre = Atoms[index].Position;
        var found = new List<(double Distance, StructureAtom Atom)>();
        var ranges = new int[3];
        if (IsPeriodic)
        {
            // Enough images along each cell vector: the cutoff over the spacing of the lattice planes it crosses.
            var (a, b, c) = (Lattice[0], Lattice[1], Lattice[2]);
            double volume = Math.Abs(Dot(a, Cross(b, c)));
            Position[] normals = [Cross(b, c), Cross(c, a), Cross(a, b)];
            for (int k = 0; k < 3; k++)
            {
                ranges[k] = (int)Math.Ceiling(rc * normals[k].Norm / volume) + 1;
            }
        }
        for (int i = -ranges[0]; i <= ranges[0]; i++)
        {
            for (int j = -ranges[1]; j <= ranges[1]; j++)
            {
                for (int k = -ranges[2]; k <= ranges[2]; k++)
                {
                    var shift = IsPeriodic ? i * Lattice[0] + j * Lattice[1] + k * Lattice[2] : Position.Origin;
                    for (int n = 0; n < Atoms.Length; n++)
                    {
                        var p = Atoms[n].Position + shift;
                        double d = (p - centre).Norm;
                        if (d <= rc && !(n == index && i == 0 && j == 0 && k == 0))
                        {
                            found.Add((d, Atoms[n] with { Position = p }));
                        }
                    }
                }
            }
        }
        return [.. found.OrderBy(f => f.Distance).Select(f => f.Atom)];
    }

    private static double Dot(Position a, Position b) => a.X * b.X + a.Y * b.Y + a.Z * b.Z;

    private static Position Cross(Position a, Position b) => new(a.Y * b.Z - a.Z * b.Y, a.Z * b.X - a.X * b.Z, a.X * b.Y - a.Y * b.X);
}

/// <summary>
/// Reads structure files. XYZ (plain: a count line, a comment line, then "label x y z" per atom in Å; extended: the
/// comment line may carry <c>Lattice="ax ay az bx by bz cx cy cz"</c> for a periodic cell). No package served here reads
/// XYZ (checked; docs/architecture.md), so this small reader is the project's own. A malformed file gets a
/// <see cref="StructureFormatException"/> naming the file, the line and what is wrong.
/// </summary>
public static class StructureFiles
{
    private static readonly Regex LatticeKey = new("(?:^|\\s)Lattice=\"([^\"]*)\"", RegexOptions.CultureInvariant | RegexOptions.IgnoreCase);

    /// <summary>Reads an XYZ file.</summary>
    /// <param name="path">The file.</param>
    public static Structure ReadXyz(string path)
    {
        Preconditions.CheckNotNull(path, nameof(path));
        using var reader = new StreamReader(path);
        return ReadXyz(reader, path);
    }

    /// <summary>Reads XYZ text.</summary>
    /// <param name="reader">The text.</param>
    /// <param name="source">Its name, for messages.</param>
    public static Structure ReadXyz(TextReader reader, string source)
    {
        Preconditions.CheckNotNull(reader, nameof(reader));
        string? countLine = reader.ReadLine();
        if (countLine is null || !int.TryParse(countLine.Trim(), NumberStyles.None, CultureInfo.InvariantCulture, out int count) || count < 1 || count > 1_000_000)
        {
            throw new StructureFormatException(source, 1, $"the first line must be the number of atoms (1 to 1000000), not '{Short(countLine)}'.");
        }
        string comment = reader.ReadLine() ?? throw new StructureFormatException(source, 2, "the file ends before the comment line.");
        var lattice = ImmutableArray<Position>.Empty;
        var match = LatticeKey.Match(comment);
        if (match.Success)
        {
            var v = match.Groups[1].Value.Split((char[]?)null, StringSplitOptions.RemoveEmptyEntries);
            var numbers = v.Select(t => double.TryParse(t, NumberStyles.Float, CultureInfo.InvariantCulture, out double x) && double.IsFinite(x) ? x : double.NaN).ToArray();
            if (numbers.Length != 9 || numbers.Any(double.IsNaN))
            {
                throw new StructureFormatException(source, 2, $"Lattice=\"…\" must hold nine finite numbers (three cell vectors, Å), not '{Short(match.Groups[1].Value)}'.");
            }
            lattice = [new Position(numbers[0], numbers[1], numbers[2]), new Position(numbers[3], numbers[4], numbers[5]), new Position(numbers[6], numbers[7], numbers[8])];
            var (a, b, c) = (lattice[0], lattice[1], lattice[2]);
            double volume = a.X * (b.Y * c.Z - b.Z * c.Y) - a.Y * (b.X * c.Z - b.Z * c.X) + a.Z * (b.X * c.Y - b.Y * c.X);
            if (!(Math.Abs(volume) > 1e-6))
            {
                throw new StructureFormatException(source, 2, "the three cell vectors of Lattice=\"…\" are coplanar (the cell has no volume).");
            }
        }
        var atoms = ImmutableArray.CreateBuilder<StructureAtom>(count);
        for (int n = 0; n < count; n++)
        {
            int lineNumber = n + 3;
            string? line = reader.ReadLine();
            if (line is null)
            {
                throw new StructureFormatException(source, lineNumber, $"the file ends after {n} of the {count} atoms its first line announces.");
            }
            var fields = line.Split((char[]?)null, StringSplitOptions.RemoveEmptyEntries);
            if (fields.Length < 4)
            {
                throw new StructureFormatException(source, lineNumber, $"an atom line needs a label and three coordinates, not '{Short(line)}'.");
            }
            var xyz = new double[3];
            for (int k = 0; k < 3; k++)
            {
                if (!double.TryParse(fields[k + 1], NumberStyles.Float, CultureInfo.InvariantCulture, out xyz[k]) || !double.IsFinite(xyz[k]) || Math.Abs(xyz[k]) > 1e6)
                {
                    throw new StructureFormatException(source, lineNumber, $"coordinate {"xyz"[k]} '{Short(fields[k + 1])}' is not a finite number of at most 1e6 Å in size.");
                }
            }
            atoms.Add(new StructureAtom(fields[0], new Position(xyz[0], xyz[1], xyz[2])));
        }
        var structure = new Structure(atoms.MoveToImmutable(), lattice, source);
        for (int i = 0; i < structure.Atoms.Length; i++)
        {
            for (int j = i + 1; j < structure.Atoms.Length; j++)
            {
                if ((structure.Atoms[i].Position - structure.Atoms[j].Position).Norm < 0.1)
                {
                    throw new StructureFormatException(source, j + 3, string.Create(CultureInfo.InvariantCulture,
                        $"atom {j + 1} ({structure.Atoms[j].Species}) lies {(structure.Atoms[i].Position - structure.Atoms[j].Position).Norm:G3} Å from atom {i + 1} (line {i + 3}): two atoms on one site (disorder or a duplicate) are not averaged; give one."));
                }
            }
        }
        return structure;
    }

    private static string Short(string? text) => text is null ? "(nothing)" : text.Length <= 60 ? text : text[..57] + "…";
}

/// <summary>A structure file that cannot be read: the file, the line and what is wrong.</summary>
public sealed class StructureFormatException : FormatException
{
    /// <summary>Creates the exception.</summary>
    /// <param name="source">The file.</param>
    /// <param name="line">The 1-based line.</param>
    /// <param name="problem">What is wrong.</param>
    public StructureFormatException(string source, int line, string problem)
        : base(string.Create(CultureInfo.InvariantCulture, $"{source}, line {line}: {problem}"))
    {
        File = source;
        Line = line;
    }

    /// <summary>The file (or the name the text was given).</summary>
    public string File { get; }

    /// <summary>The 1-based line.</summary>
    public int Line { get; }
}
