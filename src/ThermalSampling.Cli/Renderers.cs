using System;
using System.Collections.Generic;
using System.Globalization;
using System.IO;
using System.Linq;
using System.Text;
using Spectre.Console;
using Spectre.Console.Rendering;

namespace ThermalSampling.Cli;

/// <summary>The output formats of <c>run</c>, <c>sweep</c> and <c>demo</c>.</summary>
internal static class Renderers
{
    internal static readonly string[] Formats = { "table", "json", "markdown", "csv", "tidy-csv", "json-lines", "parquet", "distribution-csv" };

    /// <summary>The width a table is fitted to when standard output is not a terminal (and the most it uses on a wide one).</summary>
    internal const int DefaultWidth = 120;

    /// <summary>The width to fit tables to: the terminal's when standard output is one (60 to 240 columns), else <see cref="DefaultWidth"/>.</summary>
    internal static int OutputWidth()
    {
        try
        {
            return Console.IsOutputRedirected ? DefaultWidth : Math.Clamp(Console.WindowWidth, 60, 240);
        }
        catch (IOException)
        {
            return DefaultWidth;
        }
    }

    internal static void Write(ScenarioResults results, string format, Stream output, int width = DefaultWidth)
    {
        if (format == "json")
        {
            ReportJsonWriter.Write(results, output);
            output.WriteByte((byte)'\n');
            return;
        }
        if (format == "json-lines")
        {
            TidyWriter.WriteJsonLines(results, output);
            return;
        }
        if (format == "parquet")
        {
            TidyWriter.WriteParquet(results, output);
            return;
        }
        if (format == "distribution-csv")
        {
            using var densities = new StreamWriter(output, new UTF8Encoding(false), leaveOpen: true);
            DistributionWriter.Write(results, densities);
            return;
        }
        if (format == "tidy-csv")
        {
            using var tidy = new StreamWriter(output, new UTF8Encoding(false), leaveOpen: true);
            TidyWriter.WriteCsv(results, tidy);
            return;
        }
        var table = ReportTable.From(results);
        using var writer = new StreamWriter(output, new UTF8Encoding(false), leaveOpen: true);
        switch (format)
        {
            case "markdown":
                WriteMarkdown(table, writer);
                break;
            case "csv":
                WriteCsv(table, writer);
                break;
            default:
                WriteTable(table, writer, width);
                break;
        }
    }

    /// <summary>
    /// The title and the inputs above the table, the table split into parts that fit <paramref name="width"/> (each part
    /// repeats the temperature column), and the warnings grouped by code, word-wrapped to the width.
    /// </summary>
    private static void WriteTable(ReportTable t, TextWriter writer, int width)
    {
        var console = AnsiConsole.Create(new AnsiConsoleSettings
        {
            Ansi = AnsiSupport.No,
            ColorSystem = ColorSystemSupport.NoColors,
            Interactive = InteractionSupport.No,
            Out = new AnsiConsoleOutput(writer),
        });
        console.Profile.Width = width;
        foreach (string line in Wrap(t.Title, width, ""))
        {
            writer.WriteLine(line);
        }
        foreach (string line in Wrap("Inputs: " + t.Inputs, width, "  "))
        {
            writer.WriteLine(line);
        }
        writer.Flush();
        var text = t.Rows.Select(row => row.Select((cell, i) => ReportTable.Format(cell, t.Columns[i])).ToArray()).ToList();
        var widths = t.Columns.Select((c, i) => Math.Max(ReportTable.Header(c).Length, text.Select(r => r[i].Length).DefaultIfEmpty(0).Max())).ToArray();
        var parts = new List<List<int>>();
        var current = new List<int> { 0 };
        int used = 1 + widths[0] + 3;
        for (int i = 1; i < widths.Length; i++)
        {
            if (used + widths[i] + 3 > width && current.Count > 1)
            {
                parts.Add(current);
                current = [0];
                used = 1 + widths[0] + 3;
            }
            current.Add(i);
            used += widths[i] + 3;
        }
        parts.Add(current);
        foreach (var part in parts)
        {
            var table = new Table { Border = TableBorder.Rounded };
            foreach (int i in part)
            {
                table.AddColumn(new TableColumn(Markup.Escape(ReportTable.Header(t.Columns[i]))).RightAligned().NoWrap());
            }
            foreach (var row in text)
            {
                table.AddRow(part.Select(i => (IRenderable)new Text(row[i])).ToArray());
            }
            console.Write(table);
        }
        foreach (var (codes, temperatures, message) in GroupWarnings(t.Warnings))
        {
            foreach (string line in Wrap($"warning [{codes}] at {temperatures} K: {message}", width, "    "))
            {
                console.WriteLine(line);
            }
        }
    }

    /// <summary>
    /// Warnings for people: the quantum and de Broglie warnings of one temperature as one entry (they say the same thing),
    /// then entries with the same code and the same text across temperatures as one ("at 10, 30 K"); otherwise one per
    /// temperature. The JSON keeps every code of every result.
    /// </summary>
    internal static List<(string Codes, string Temperatures, string Message)> GroupWarnings(IReadOnlyList<(double Temperature, string Code, string Message)> warnings)
    {
        var merged = new List<(double Temperature, string Code, string Message)>();
        foreach (var w in warnings)
        {
            if (w.Code == Analysis.WarningCodes.DeBroglieWavelength)
            {
                int q = merged.FindIndex(m => m.Temperature == w.Temperature && m.Code == Analysis.WarningCodes.QuantumEffects);
                if (q >= 0)
                {
                    merged[q] = (w.Temperature, merged[q].Code + ", " + w.Code, merged[q].Message + " " + w.Message);
                    continue;
                }
            }
            merged.Add(w);
        }
        return merged
            .GroupBy(w => (w.Code, w.Message))
            .Select(g => (g.Key.Code, string.Join(", ", g.Select(w => w.Temperature.ToString("G6", CultureInfo.InvariantCulture))), g.Key.Message))
            .ToList();
    }

    /// <summary>Word-wraps <paramref name="text"/> to <paramref name="width"/> columns, continuation lines indented; a word longer than a line is split.</summary>
    internal static IEnumerable<string> Wrap(string text, int width, string indent)
    {
        var line = new StringBuilder();
        foreach (string word in text.Split(' ', StringSplitOptions.RemoveEmptyEntries))
        {
            string w = word;
            while (true)
            {
                int room = width - line.Length - (line.Length > 0 ? 1 : 0);
                if (w.Length <= room)
                {
                    line.Append(line.Length > 0 ? " " : "").Append(w);
                    break;
                }
                if (line.Length > indent.Length)
                {
                    yield return line.ToString();
                    line.Clear().Append(indent);
                    continue;
                }
                int take = Math.Max(1, width - line.Length);
                yield return line.Append(w[..take]).ToString();
                line.Clear().Append(indent);
                w = w[take..];
            }
        }
        if (line.Length > indent.Length || (line.Length > 0 && indent.Length == 0))
        {
            yield return line.ToString();
        }
    }

    private static void WriteMarkdown(ReportTable t, TextWriter w)
    {
        w.WriteLine($"### {t.Title}");
        w.WriteLine();
        w.WriteLine($"Inputs: {t.Inputs}");
        w.WriteLine();
        w.WriteLine("| " + string.Join(" | ", t.Columns.Select(ReportTable.Header)) + " |");
        w.WriteLine("|" + string.Concat(t.Columns.Select(_ => "---:|")));
        foreach (var row in t.Rows)
        {
            w.WriteLine("| " + string.Join(" | ", row.Select((cell, i) => ReportTable.Format(cell, t.Columns[i]))) + " |");
        }
        if (t.Warnings.Count > 0)
        {
            w.WriteLine();
            foreach (var (temperature, code, message) in t.Warnings)
            {
                w.WriteLine(string.Create(CultureInfo.InvariantCulture, $"- **{temperature:G6} K, `{code}`**: {message}"));
            }
        }
    }

    private static void WriteCsv(ReportTable t, TextWriter w)
    {
        var headers = t.Columns.SelectMany(c => c.HasError ? new[] { ReportTable.Header(c), ReportTable.Header(c) + " stderr" } : new[] { ReportTable.Header(c) });
        w.WriteLine(string.Join(",", headers.Select(Quote)));
        foreach (var row in t.Rows)
        {
            var cells = row.Zip(t.Columns).SelectMany(p => p.Second.HasError ? new[] { Number(p.First.Value), Number(p.First.Error) }
                : new[] { p.First.Text is string text ? Quote(text) : Number(p.First.Value) });
            w.WriteLine(string.Join(",", cells));
        }
    }

    private static string Number(double v) => double.IsFinite(v) ? v.ToString("R", CultureInfo.InvariantCulture) : "";

    private static string Quote(string s) => s.Contains(',') || s.Contains('"') ? "\"" + s.Replace("\"", "\"\"") + "\"" : s;
}
