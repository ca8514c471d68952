using System;
using System.Collections.Generic;
using System.IO;
using System.Linq;
using System.Text.RegularExpressions;
using ArchUnitNET.Domain;
using ArchUnitNET.Loader;
using Xunit;

namespace ThermalSampling.Tests;

/// <summary>
/// The layers of docs/architecture.md, enforced on the compiled library: every dependency of every type (signatures and
/// method bodies, as ArchUnitNET reads them from the IL) must point to its own layer or to one its row names.
/// </summary>
public class ArchitectureTests
{
    private const string Root = "ThermalSampling";

    private static readonly Lazy<Architecture> Library = new(() => new ArchLoader().LoadAssemblies(typeof(PairSampler).Assembly).Build());

    /// <summary>The layer table of docs/architecture.md: layer → the layers it may use.</summary>
    internal static Dictionary<string, HashSet<string>> DocumentedLayers()
    {
        var doc = File.ReadAllLines(Path.Combine(RepositoryRoot(), "docs", "architecture.md"));
        var layers = new Dictionary<string, HashSet<string>>();
        bool inTable = false;
        foreach (var line in doc)
        {
            if (line.StartsWith("| layer | holds | depends on |", StringComparison.Ordinal))
            {
                inTable = true;
                continue;
            }
            if (!inTable || line.StartsWith("|---", StringComparison.Ordinal))
            {
                continue;
            }
            if (!line.StartsWith('|'))
            {
                break;
            }
            var cells = line.Split('|');
            string layer = cells[1].Trim().Trim('`');
            var uses = Regex.Matches(cells[^2], "`([A-Za-z]+)`").Select(m => m.Groups[1].Value).ToHashSet();
            layers[layer] = uses;
        }
        return layers;
    }

    private static string RepositoryRoot() => Repository.Root;

    private static string? LayerOf(IType type)
    {
        if (type is GenericParameter)
        {
            return null; // a type parameter: ArchUnitNET names it after the first method that declared one of that name
        }
        string? ns = type.Namespace?.FullName;
        if (ns is null)
        {
            return null; // generic parameters, <Module>
        }
        if (ns == Root)
        {
            return Root;
        }
        if (ns.StartsWith(Root + ".", StringComparison.Ordinal))
        {
            return ns.Substring(Root.Length + 1).Split('.')[0];
        }
        return null; // outside the library (System, MathNet)
    }

    private static List<string> Violations(Dictionary<string, HashSet<string>> layers)
    {
        var violations = new List<string>();
        foreach (var type in Library.Value.Types)
        {
            string? from = LayerOf(type);
            if (from is null)
            {
                continue;
            }
            if (!layers.TryGetValue(from, out var allowed))
            {
                violations.Add($"{type.FullName}: namespace layer '{from}' is not in the table of docs/architecture.md");
                continue;
            }
            foreach (var dependency in type.Dependencies)
            {
                string? to = LayerOf(dependency.Target);
                if (to is not null && to != from && !allowed.Contains(to))
                {
                    violations.Add($"{type.FullName} ({from}) uses {dependency.Target.FullName} ({to})");
                }
            }
        }
        return violations.Distinct().ToList();
    }

    [Fact]
    public void EveryDependencyFollowsTheDocumentedLayers()
    {
        var violations = Violations(DocumentedLayers());
        Assert.True(violations.Count == 0, "Dependencies against docs/architecture.md:\n" + string.Join("\n", violations.Take(40)));
    }

    [Fact]
    public void TheTableIsAcyclicAndNamesOnlyItsOwnLayers()
    {
        var layers = DocumentedLayers();
        Assert.True(layers.Count >= 12, $"read {layers.Count} layers from docs/architecture.md");
        foreach (var (layer, uses) in layers)
        {
            Assert.All(uses, u => Assert.True(layers.ContainsKey(u), $"{layer} names unknown layer {u}"));
        }
        // Depth-first search for a cycle.
        var state = new Dictionary<string, int>();
        bool Cyclic(string l)
        {
            if (state.TryGetValue(l, out int s))
            {
                return s == 1;
            }
            state[l] = 1;
            bool found = layers[l].Any(Cyclic);
            state[l] = 2;
            return found;
        }
        Assert.DoesNotContain(layers.Keys, Cyclic);
    }

    /// <summary>The check sees dependencies inside method bodies: take away one arrow the code really uses and it must fail.</summary>
    [Theory]
    [InlineData("Sampling", "Statistics")]   // lane groups fill batch-mean stores
    [InlineData("Potentials", "Numerics")]   // lane forms
    [InlineData("Statistics", "Persistence")] // accumulators save themselves
    [InlineData("Reports", "Sampling")]      // summaries read run records
    public void RemovingAnArrowTheCodeUsesFails(string layer, string used)
    {
        var layers = DocumentedLayers();
        layers[layer] = layers[layer].Where(u => u != used).ToHashSet();
        Assert.Contains(Violations(layers), v => v.Contains($"({layer}) uses", StringComparison.Ordinal) && v.EndsWith($"({used})", StringComparison.Ordinal));
    }
}
