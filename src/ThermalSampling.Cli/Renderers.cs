using System;
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
    internal static readonly string[] Formats = { "table", "json", "markdown", "csv" };

    internal static void Write(ScenarioResults results, string format, Stream output)
    {
        if (format == "json")
        {
            ReportJsonWriter.Write(results, output);
            output.WriteByte((byte)'\n');
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
                WriteTable(table, writer);
                break;
        }
    }

    private static void WriteTable(ReportTable t, TextWriter writer)
    {
        var console = AnsiConsole.Create(new AnsiConsoleSettings
        {
            Ansi = AnsiSupport.No,
            ColorSystem = ColorSystemSupport.NoColors,
            Interactive = InteractionSupport.No,
            Out = new AnsiConsoleOutput(writer),
        });
        console.Profile.Width = 240;
        var table = new Table { Border = TableBorder.Rounded, Title = new TableTitle(Markup.Escape(t.Title)) };
        foreach (var c in t.Columns)
        {
            table.AddColumn(new TableColumn(Markup.Escape(ReportTable.Header(c))).RightAligned());
        }
        foreach (var row in t.Rows)
        {
            table.AddRow(row.Select(cell => (IRenderable)new Text(ReportTable.Format(cell))).ToArray());
        }
        console.Write(table);
        foreach (var (temperature, code, message) in t.Warnings)
        {
            console.WriteLine(string.Create(CultureInfo.InvariantCulture, $"warning at {temperature:G6} K [{code}]: {message}"));
        }
    }

    private static void WriteMarkdown(ReportTable t, TextWriter w)
    {
        w.WriteLine($"### {t.Title}");
        w.WriteLine();
        w.WriteLine("| " + string.Join(" | ", t.Columns.Select(ReportTable.Header)) + " |");
        w.WriteLine("|" + string.Concat(t.Columns.Select(_ => "---:|")));
        foreach (var row in t.Rows)
        {
            w.WriteLine("| " + string.Join(" | ", row.Select(ReportTable.Format)) + " |");
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
            var cells = row.Zip(t.Columns).SelectMany(p => p.Second.HasError ? new[] { Number(p.First.Value), Number(p.First.Error) } : new[] { Number(p.First.Value) });
            w.WriteLine(string.Join(",", cells));
        }
    }

    private static string Number(double v) => double.IsFinite(v) ? v.ToString("R", CultureInfo.InvariantCulture) : "";

    private static string Quote(string s) => s.Contains(',') || s.Contains('"') ? "\"" + s.Replace("\"", "\"\"") + "\"" : s;
}
