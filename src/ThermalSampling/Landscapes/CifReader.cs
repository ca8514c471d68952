using System;
using System.Collections.Generic;
using System.Collections.Immutable;
using System.Globalization;
using System.IO;
using System.Linq;
using ThermalSampling.Internal;

namespace ThermalSampling.Landscapes;

/// <summary>
/// Reads the part of a CIF file (the IUCr Crystallographic Information File, core dictionary) a site needs: the cell
/// (<c>_cell_length_a/b/c</c>, <c>_cell_angle_alpha/beta/gamma</c>), the symmetry operations as xyz strings
/// (<c>_space_group_symop_operation_xyz</c> or the older <c>_symmetry_equiv_pos_as_xyz</c>) and the atom sites
/// (<c>_atom_site_label</c>, <c>_atom_site_type_symbol</c>, <c>_atom_site_fract_x/y/z</c>, <c>_atom_site_occupancy</c>).
/// The sites are expanded by every operation into the whole cell (equal positions within 1e-4 of the cell merged), and
/// the cell set in Cartesian axes with a along x and b in the xy plane. A space-group name alone is not enough: a file
/// without operations is refused, naming what is missing; a partial occupancy (disorder) is refused, never averaged. A
/// tag's value may stand on a later line (after blank and comment lines) or be a text field (<c>;</c> … <c>;</c>), as
/// titles and names in real files are; a tag without a value is refused, naming it. No
/// package served here reads CIF (docs/architecture.md), so this reader is the project's own.
/// </summary>
public static class CifReader
{
    /// <summary>Reads CIF text into a periodic structure; the species of an atom is its type symbol (or, without one, its label).</summary>
    /// <param name="reader">The text.</param>
    /// <param name="source">Its name, for messages.</param>
    /// <exception cref="StructureFormatException">A malformed file, or one that lacks what a structure needs.</exception>
    public static Structure Read(TextReader reader, string source)
    {
        Preconditions.CheckNotNull(reader, nameof(reader));
        var items = new Dictionary<string, (string Value, int Line)>(StringComparer.OrdinalIgnoreCase);
        var loops = new List<(List<string> Tags, List<(string Value, int Line)> Values, int Line)>();
        var lines = new List<string>();
        for (string? text = reader.ReadLine(); text is not null; text = reader.ReadLine())
        {
            lines.Add(text);
        }
        List<string>? loopTags = null;
        List<(string, int)>? loopValues = null;
        int loopLine = 0;
        for (int n = 0; n < lines.Count; n++)
        {
            string line = lines[n];
            int number = n + 1;
            if (line.StartsWith(';'))
            {
                // A text field: skip to its closing semicolon (its content is prose, not needed here).
                int end = n + 1;
                while (end < lines.Count && !lines[end].StartsWith(';'))
                {
                    end++;
                }
                if (end == lines.Count)
                {
                    throw new StructureFormatException(source, number, "a text field opened with ';' is never closed.");
                }
                if (loopValues is not null)
                {
                    loopValues.Add(("?", number));
                }
                n = end;
                continue;
            }
            var tokens = Tokens(line, source, number);
            if (tokens.Count == 0)
            {
                continue;
            }
            if (tokens[0].Equals("loop_", StringComparison.OrdinalIgnoreCase))
            {
                Close();
                loopTags = [];
                loopValues = [];
                loopLine = number;
                continue;
            }
            if (tokens[0].StartsWith("data_", StringComparison.OrdinalIgnoreCase))
            {
                Close();
                continue;
            }
            if (tokens[0].StartsWith('_'))
            {
                if (loopTags is not null && loopValues!.Count == 0)
                {
                    loopTags.Add(tokens[0]);
                    continue;
                }
                Close();
                string value;
                if (tokens.Count > 1)
                {
                    value = tokens[1];
                }
                else
                {
                    (value, n) = ValueOnLaterLine(lines, n, tokens[0], source);
                }
                items[tokens[0]] = (value, number);
                continue;
            }
            if (loopTags is null)
            {
                throw new StructureFormatException(source, number, $"'{tokens[0]}' is a value without a tag or a loop.");
            }
            loopValues!.AddRange(tokens.Select(t => (t, number)));
        }
        Close();

        void Close()
        {
            if (loopTags is { Count: > 0 })
            {
                loops.Add((loopTags, loopValues!, loopLine));
            }
            loopTags = null;
            loopValues = null;
        }

        double Cell(string tag)
        {
            if (!items.TryGetValue(tag, out var item))
            {
                throw new StructureFormatException(source, lines.Count, $"the file gives no {tag}: a cell needs _cell_length_a, _b, _c and _cell_angle_alpha, _beta, _gamma.");
            }
            return Number(item.Value, tag, source, item.Line);
        }
        double a = Cell("_cell_length_a"), b = Cell("_cell_length_b"), c = Cell("_cell_length_c");
        double alpha = Cell("_cell_angle_alpha") * Math.PI / 180, beta = Cell("_cell_angle_beta") * Math.PI / 180, gamma = Cell("_cell_angle_gamma") * Math.PI / 180;
        var va = new Position(a, 0, 0);
        var vb = new Position(b * Math.Cos(gamma), b * Math.Sin(gamma), 0);
        double cx = c * Math.Cos(beta), cy = c * (Math.Cos(alpha) - Math.Cos(beta) * Math.Cos(gamma)) / Math.Sin(gamma);
        double cz2 = c * c - cx * cx - cy * cy;
        if (!(cz2 > 0) || a <= 0 || b <= 0 || c <= 0)
        {
            throw new StructureFormatException(source, items["_cell_angle_alpha"].Line, "the cell lengths and angles do not make a cell with volume.");
        }
        var vc = new Position(cx, cy, Math.Sqrt(cz2));

        var symmetry = loops.FirstOrDefault(l => l.Tags.Any(t => t.Equals("_space_group_symop_operation_xyz", StringComparison.OrdinalIgnoreCase)
            || t.Equals("_symmetry_equiv_pos_as_xyz", StringComparison.OrdinalIgnoreCase)));
        var operations = new List<(double[] Matrix, double[] Shift)>();
        if (symmetry.Tags is null)
        {
            if (items.TryGetValue("_space_group_symop_operation_xyz", out var single) || items.TryGetValue("_symmetry_equiv_pos_as_xyz", out single))
            {
                operations.Add(Operation(single.Value, source, single.Line));
            }
            else
            {
                throw new StructureFormatException(source, lines.Count,
                    "the file lists no symmetry operations (_space_group_symop_operation_xyz or _symmetry_equiv_pos_as_xyz): a space-group name alone is not enough to build the cell.");
            }
        }
        else
        {
            int column = symmetry.Tags.FindIndex(t => t.EndsWith("_xyz", StringComparison.OrdinalIgnoreCase));
            for (int k = column; k < symmetry.Values.Count; k += symmetry.Tags.Count)
            {
                operations.Add(Operation(symmetry.Values[k].Value, source, symmetry.Values[k].Line));
            }
        }

        var sites = loops.FirstOrDefault(l => l.Tags.Any(t => t.Equals("_atom_site_fract_x", StringComparison.OrdinalIgnoreCase)));
        if (sites.Tags is null)
        {
            throw new StructureFormatException(source, lines.Count, "the file lists no atom sites (a loop with _atom_site_label and _atom_site_fract_x, _y, _z).");
        }
        int Col(string tag) => sites.Tags.FindIndex(t => t.Equals(tag, StringComparison.OrdinalIgnoreCase));
        int label = Col("_atom_site_label"), type = Col("_atom_site_type_symbol"), fx = Col("_atom_site_fract_x"), fy = Col("_atom_site_fract_y"),
            fz = Col("_atom_site_fract_z"), occupancy = Col("_atom_site_occupancy");
        if (label < 0 || fy < 0 || fz < 0)
        {
            throw new StructureFormatException(source, sites.Line, "the atom-site loop needs _atom_site_label and _atom_site_fract_x, _y and _z.");
        }
        int width = sites.Tags.Count;
        if (sites.Values.Count % width != 0)
        {
            throw new StructureFormatException(source, sites.Values[^1].Line, $"the atom-site loop has {sites.Values.Count} values, not a whole number of rows of {width}.");
        }
        var fractional = new List<(string Species, double[] F, string Label)>();
        for (int row = 0; row < sites.Values.Count / width; row++)
        {
            (string Value, int Line) At(int col) => sites.Values[row * width + col];
            var name = At(label);
            if (occupancy >= 0 && At(occupancy).Value is not ("?" or ".") && Math.Abs(Number(At(occupancy).Value, "_atom_site_occupancy", source, At(occupancy).Line) - 1) > 1e-6)
            {
                throw new StructureFormatException(source, At(occupancy).Line,
                    $"atom {name.Value} has occupancy {At(occupancy).Value}: partial occupancy (disorder) is not averaged; give an ordered model.");
            }
            string species = type >= 0 && At(type).Value is not ("?" or ".") ? At(type).Value : name.Value;
            double[] f = [Number(At(fx).Value, "_atom_site_fract_x", source, At(fx).Line), Number(At(fy).Value, "_atom_site_fract_y", source, At(fy).Line),
                Number(At(fz).Value, "_atom_site_fract_z", source, At(fz).Line)];
            foreach (var (m, t) in operations)
            {
                var g = new double[3];
                for (int i = 0; i < 3; i++)
                {
                    g[i] = m[3 * i] * f[0] + m[3 * i + 1] * f[1] + m[3 * i + 2] * f[2] + t[i];
                    g[i] -= Math.Floor(g[i]);
                    if (g[i] > 1 - 1e-9)
                    {
                        g[i] = 0;
                    }
                }
                bool seen = fractional.Any(p => Enumerable.Range(0, 3).All(i => { double d = Math.Abs(p.F[i] - g[i]); return Math.Min(d, 1 - d) < 1e-4; }));
                if (!seen)
                {
                    fractional.Add((species, g, name.Value));
                }
            }
        }
        var atoms = fractional.Select(p => new StructureAtom(p.Species, p.F[0] * va + p.F[1] * vb + p.F[2] * vc, p.Label)).ToImmutableArray();
        return new Structure(atoms, [va, vb, vc], source);
    }

    /// <summary>A CIF number: a standard uncertainty in parentheses is dropped ("5.431(2)" is 5.431).</summary>
    private static double Number(string text, string tag, string source, int line)
    {
        int paren = text.IndexOf('(', StringComparison.Ordinal);
        string plain = paren >= 0 ? text[..paren] : text;
        if (!double.TryParse(plain, NumberStyles.Float, CultureInfo.InvariantCulture, out double v) || !double.IsFinite(v))
        {
            throw new StructureFormatException(source, line, $"{tag} '{text}' is not a number.");
        }
        return v;
    }

    /// <summary>"x,y,z"-style operation (terms ±x, ±y, ±z and fractions or decimals, in any order) as a matrix and a shift.</summary>
    private static (double[] Matrix, double[] Shift) Operation(string text, string source, int line)
    {
        var parts = text.Replace(" ", "", StringComparison.Ordinal).ToLowerInvariant().Split(',');
        if (parts.Length != 3)
        {
            throw new StructureFormatException(source, line, $"symmetry operation '{text}' does not have three comma-separated parts.");
        }
        var m = new double[9];
        var t = new double[3];
        for (int row = 0; row < 3; row++)
        {
            string s = parts[row];
            int k = 0;
            while (k < s.Length)
            {
                double sign = 1;
                if (s[k] is '+' or '-')
                {
                    sign = s[k] == '-' ? -1 : 1;
                    k++;
                }
                int start = k;
                while (k < s.Length && s[k] is not ('+' or '-'))
                {
                    k++;
                }
                string term = s[start..k];
                int axis = term.Length == 0 ? -1 : "xyz".IndexOf(term[^1], StringComparison.Ordinal);
                if (axis >= 0)
                {
                    string factor = term[..^1].TrimEnd('*');
                    m[3 * row + axis] += sign * (factor.Length == 0 ? 1 : Fraction(factor, text, source, line));
                }
                else
                {
                    t[row] += sign * Fraction(term, text, source, line);
                }
            }
        }
        return (m, t);
    }

    private static double Fraction(string term, string op, string source, int line)
    {
        var halves = term.Split('/');
        if (halves.Length <= 2 && halves.All(h => double.TryParse(h, NumberStyles.Float, CultureInfo.InvariantCulture, out _)))
        {
            double v = double.Parse(halves[0], CultureInfo.InvariantCulture);
            return halves.Length == 2 ? v / double.Parse(halves[1], CultureInfo.InvariantCulture) : v;
        }
        throw new StructureFormatException(source, line, $"symmetry operation '{op}' has a term '{term}' that is neither ±x, ±y, ±z nor a number.");
    }

    /// <summary>The whitespace-separated tokens of a line, quotes respected, a comment (#) dropped.</summary>
    /// <summary>
    /// The value of the tag alone on line <paramref name="n"/> (0-based): the first token of the next line that has one
    /// (blank and comment lines skipped), or the text field (<c>;</c> … <c>;</c>) that opens there, its lines joined with
    /// line breaks; with the index of the last line it took.
    /// </summary>
    private static (string Value, int Last) ValueOnLaterLine(List<string> lines, int n, string tag, string source)
    {
        for (int m = n + 1; m < lines.Count; m++)
        {
            if (lines[m].StartsWith(';'))
            {
                int end = m + 1;
                while (end < lines.Count && !lines[end].StartsWith(';'))
                {
                    end++;
                }
                if (end == lines.Count)
                {
                    throw new StructureFormatException(source, m + 1, "a text field opened with ';' is never closed.");
                }
                var text = new List<string> { lines[m][1..] };
                text.AddRange(lines.Skip(m + 1).Take(end - m - 1));
                return (string.Join('\n', text).Trim(), end);
            }
            var tokens = Tokens(lines[m], source, m + 1);
            if (tokens.Count == 0)
            {
                continue;
            }
            if (tokens.Count > 1 || tokens[0].StartsWith('_') || tokens[0].Equals("loop_", StringComparison.OrdinalIgnoreCase)
                || tokens[0].StartsWith("data_", StringComparison.OrdinalIgnoreCase))
            {
                throw new StructureFormatException(source, n + 1, $"the tag {tag} has no value of its own (line {m + 1} holds '{lines[m].Trim()}'): give one value after it, on its line or the next.");
            }
            return (tokens[0], m);
        }
        throw new StructureFormatException(source, n + 1, $"the tag {tag} has no value: the file ends after it.");
    }

    private static List<string> Tokens(string line, string source, int number)
    {
        var tokens = new List<string>();
        int i = 0;
        while (i < line.Length)
        {
            if (char.IsWhiteSpace(line[i]))
            {
                i++;
                continue;
            }
            if (line[i] == '#')
            {
                break;
            }
            if (line[i] is '\'' or '"')
            {
                char quote = line[i];
                int end = i + 1;
                while (end < line.Length && !(line[end] == quote && (end + 1 == line.Length || char.IsWhiteSpace(line[end + 1]))))
                {
                    end++;
                }
                if (end >= line.Length)
                {
                    throw new StructureFormatException(source, number, $"a value opened with {quote} is not closed on its line.");
                }
                tokens.Add(line[(i + 1)..end]);
                i = end + 1;
                continue;
            }
            int start = i;
            while (i < line.Length && !char.IsWhiteSpace(line[i]))
            {
                i++;
            }
            tokens.Add(line[start..i]);
        }
        return tokens;
    }
}
