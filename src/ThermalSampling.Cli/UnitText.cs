using System;
using System.Globalization;
using System.Text.RegularExpressions;

namespace ThermalSampling.Cli;

/// <summary>
/// Rewrites the quantities in a warning's text from the library's eV and Å into the scenario's own units, so that a
/// user who wrote meV and nm reads meV and nm. Only numbers followed by a unit are touched ("0.0079 eV", "0.216 Å",
/// "0.06 Å²", "(1.7, 0.98, 2.7) Å"); ratios, percentages and kelvins stay as they are.
/// </summary>
internal static partial class UnitText
{
    [GeneratedRegex(@"\((-?[0-9.]+(?:[eE][-+]?[0-9]+)?), (-?[0-9.]+(?:[eE][-+]?[0-9]+)?), (-?[0-9.]+(?:[eE][-+]?[0-9]+)?)\) Å(?![²a-zA-Z])")]
    private static partial Regex Vector();

    [GeneratedRegex(@"(?<![\w.])(-?[0-9]+(?:\.[0-9]+)?(?:[eE][-+]?[0-9]+)?) (eV|Å²|Å)(?![\w/])")]
    private static partial Regex Scalar();

    /// <summary>The message in <paramref name="energyUnit"/> and <paramref name="lengthUnit"/> (scenario unit names).</summary>
    internal static string InUnits(string message, string energyUnit, string lengthUnit)
    {
        double e = ScenarioUnits.Energy[energyUnit], l = ScenarioUnits.Length[lengthUnit];
        string energyLabel = energyUnit == "K" ? "K (as E/kB)" : energyUnit;
        string lengthLabel = lengthUnit == "angstrom" ? "Å" : lengthUnit;
        if (energyUnit == "eV" && lengthUnit == "angstrom")
        {
            return message;
        }
        string Number(string text, double scale) => (double.Parse(text, CultureInfo.InvariantCulture) / scale).ToString("G4", CultureInfo.InvariantCulture);
        message = Vector().Replace(message, m => $"({Number(m.Groups[1].Value, l)}, {Number(m.Groups[2].Value, l)}, {Number(m.Groups[3].Value, l)}) {lengthLabel}");
        return Scalar().Replace(message, m => m.Groups[2].Value switch
        {
            "eV" => $"{Number(m.Groups[1].Value, e)} {energyLabel}",
            "Å²" => $"{Number(m.Groups[1].Value, l * l)} {lengthLabel}²",
            _ => $"{Number(m.Groups[1].Value, l)} {lengthLabel}",
        });
    }
}
