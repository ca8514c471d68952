using System;
using System.IO;
using System.Linq;
using System.Reflection;
using System.Runtime.CompilerServices;
using System.Xml.Linq;
using ThermalSampling.Units;
using Xunit;

namespace ThermalSampling.Tests;

/// <summary>Reflection tests that enforce the project's conventions on the public surface.</summary>
public class ConventionTests
{
    private static readonly Assembly Library = typeof(Energy).Assembly;

    private static bool IsInitOnly(MethodInfo setter)
        => setter.ReturnParameter.GetRequiredCustomModifiers().Contains(typeof(IsExternalInit));

    [Fact]
    public void Every_warning_code_is_documented_and_asserted()
    {
        // docs/validity.md lists exactly the codes of WarningCodes, and every code is asserted by a test somewhere
        // (its WarningCodes name appears in an Assert line of a test file other than this one).
        string root = Repository.Root;
        var codes = typeof(Analysis.WarningCodes).GetFields(BindingFlags.Public | BindingFlags.Static)
            .Where(f => f.IsLiteral).ToDictionary(f => (string)f.GetRawConstantValue()!, f => f.Name);
        var documented = File.ReadAllLines(Path.Combine(root, "docs", "validity.md"))
            .Where(l => l.StartsWith("| `", StringComparison.Ordinal))
            .Select(l => l.Split('`')[1]).ToHashSet();
        Assert.Equal(codes.Keys.Order(), documented.Order());
        var assertLines = Directory.GetFiles(Path.Combine(root, "tests", "ThermalSampling.Tests"), "*.cs")
            .Where(f => !f.EndsWith(nameof(ConventionTests) + ".cs", StringComparison.Ordinal))
            .SelectMany(File.ReadAllLines)
            .Where(l => l.Contains("Assert.", StringComparison.Ordinal))
            .ToList();
        var unasserted = codes.Values.Where(name => !assertLines.Any(l => l.Contains("WarningCodes." + name, StringComparison.Ordinal))).ToList();
        Assert.True(unasserted.Count == 0, "no test asserts: " + string.Join(", ", unasserted));
    }

    [Fact]
    public void Public_types_expose_no_mutable_state()
    {
        var offenders = Library.GetExportedTypes()
            .Where(t => !t.IsSubclassOf(typeof(Exception)))
            .SelectMany(t => t.GetProperties(BindingFlags.Public | BindingFlags.Instance | BindingFlags.Static | BindingFlags.DeclaredOnly)
                .Where(p => p.SetMethod is { IsPublic: true } s && !IsInitOnly(s))
                .Select(p => $"{t.Name}.{p.Name} has a public setter")
                .Concat(t.GetFields(BindingFlags.Public | BindingFlags.Instance | BindingFlags.Static | BindingFlags.DeclaredOnly)
                    .Where(f => !f.IsLiteral && !f.IsInitOnly && !t.IsEnum)
                    .Select(f => $"{t.Name}.{f.Name} is a writable public field")))
            .ToList();
        Assert.True(offenders.Count == 0, string.Join(Environment.NewLine, offenders));
    }

    [Fact]
    public void Every_public_type_and_member_has_xml_documentation()
    {
        string xmlPath = Path.ChangeExtension(Library.Location, ".xml");
        Assert.True(File.Exists(xmlPath), $"{xmlPath} is missing: GenerateDocumentationFile must stay on.");
        var documented = XDocument.Load(xmlPath).Descendants("member")
            .Where(m => m.Elements().Any(e => e.Name == "summary" || e.Name == "inheritdoc"))
            .Select(m => (string)m.Attribute("name")!)
            .ToHashSet();
        var missing = Library.GetExportedTypes().Where(t => !documented.Contains("T:" + t.FullName)).Select(t => t.FullName).ToList();
        Assert.True(missing.Count == 0, "Undocumented types: " + string.Join(", ", missing));
    }

    [Fact]
    public void Library_depends_only_on_MathNet_and_the_framework()
    {
        var references = Library.GetReferencedAssemblies().Select(a => a.Name!).Where(n => !n.StartsWith("System", StringComparison.Ordinal) && n != "netstandard").ToList();
        Assert.All(references, n => Assert.StartsWith("MathNet.Numerics", n));
    }

    [Fact]
    public void Public_api_files_are_tracked_beside_the_library()
    {
        string root = Repository.Root;
        string unshipped = File.ReadAllText(Path.Combine(root, "src", "ThermalSampling", "PublicAPI.Unshipped.txt"));
        Assert.Contains("ThermalSampling.Units.Energy", unshipped);
    }
}
