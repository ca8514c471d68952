using System;
using System.Collections.Generic;
using System.Globalization;
using System.Linq;
using System.Threading;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Reports;
using ThermalSampling.Sampling;
using ThermalSampling.Units;

namespace ThermalSampling.Cli;

/// <summary>The results of one scenario: pair reports or site reports, one per temperature.</summary>
internal sealed record ScenarioResults(Scenario Scenario, IReadOnlyList<PairVibrationReport> Pairs, IReadOnlyList<SiteVibrationReport> Sites);

/// <summary>Turns a validated scenario into library calls, specialised on the concrete potential type.</summary>
internal static class ScenarioRunner
{
    internal static ScenarioResults Run(Scenario scenario, IProgress<SamplingProgress>? progress, CancellationToken ct)
    {
        var p = scenario.Potential;
        return p.Form switch
        {
            "lennard-jones" => Dispatch(scenario, Guard(() => p.Parameters.ContainsKey("sigma")
                ? LennardJones.FromSigmaEpsilon(Length.FromAngstroms(p.Parameters["sigma"]), Energy.FromElectronVolts(p.Parameters["epsilon"]))
                : LennardJones.FromMinimum(Length.FromAngstroms(p.Parameters["equilibriumDistance"]), Energy.FromElectronVolts(p.Parameters["wellDepth"])), "$.potential"), progress, ct),
            "morse" => Dispatch(scenario, Guard(() => new Morse(Energy.FromElectronVolts(p.Parameters["wellDepth"]), p.Parameters["width"],
                Length.FromAngstroms(p.Parameters["equilibriumDistance"])), "$.potential"), progress, ct),
            "buckingham" => Dispatch(scenario, Guard(() => new Buckingham(Energy.FromElectronVolts(p.Parameters["A"]), Length.FromAngstroms(p.Parameters["rho"]),
                p.Parameters["C"]), "$.potential"), progress, ct),
            "harmonic" => Dispatch(scenario, Guard(() => new HarmonicBond(p.Parameters["stiffness"], Length.FromAngstroms(p.Parameters["equilibriumDistance"])), "$.potential"), progress, ct),
            "table" => Dispatch(scenario, Guard(() => new TabulatedPotential(p.TableR, p.TableEnergy), "$.potential"), progress, ct),
            _ => throw new ScenarioException(new[] { $"$.potential.form: '{p.Form}' is not a known form." }),
        };
    }

    private static T Guard<T>(Func<T> build, string path)
    {
        try
        {
            return build();
        }
        catch (ArgumentException ex)
        {
            throw new ScenarioException(new[] { $"{path}: {FirstSentences(ex.Message)}" });
        }
    }

    private static string FirstSentences(string message) => message.Split(" (Parameter '")[0];

    private static string LandscapePath(string? parameter) => parameter switch
    {
        "windowLower" or "windowUpper" or "window" => "$.landscape.window",
        "sites" => "$.landscape.sites",
        _ when parameter?.StartsWith("sites[", StringComparison.Ordinal) == true => "$.landscape.sites",
        _ when parameter?.StartsWith("centre", StringComparison.Ordinal) == true => "$.landscape.centre",
        _ when parameter?.StartsWith("confinement", StringComparison.Ordinal) == true => "$.landscape.confinement",
        _ => "$.landscape",
    };

    private static ScenarioResults Dispatch<TPotential>(Scenario scenario, TPotential potential, IProgress<SamplingProgress>? progress, CancellationToken ct)
        where TPotential : struct, IPairPotential
    {
        var l = scenario.Landscape;
        var mass = Mass.FromAtomicMassUnits(scenario.MassInAtomicMassUnits);
        var temperatures = scenario.TemperaturesInKelvin.Select(Temperature.FromKelvin).ToList();
        try
        {
            if (l.Kind is "line" or "radial")
            {
                var landscape = PairLandscape.Create(potential, l.Kind == "line" ? SeparationGeometry.Line : SeparationGeometry.Radial,
                    Length.FromAngstroms(l.WindowLower), Length.FromAngstroms(l.WindowUpper));
                var reports = temperatures.Select(t => PairSampler.Run(landscape, mass, t, scenario.Sampling, progress, ct)).ToList();
                return new ScenarioResults(scenario, reports, Array.Empty<SiteVibrationReport>());
            }
            var sites = l.Lattice is null
                ? l.Sites
                : LatticeSites.NeighbourCage(l.Lattice switch
                {
                    "fcc" => LatticeKind.FaceCentredCubic,
                    "bcc" => LatticeKind.BodyCentredCubic,
                    "sc" => LatticeKind.SimpleCubic,
                    _ => LatticeKind.HexagonalClosePacked,
                }, Length.FromAngstroms(l.NearestNeighbourDistance), l.Shells).Select(s => s + l.Centre).ToImmutableArrayCompat();
            var siteLandscape = SiteLandscape.Create(potential, sites, l.Centre, l.Confinement!.Value);
            var siteReports = temperatures.Select(t => SiteSampler.Run(siteLandscape, mass, t, scenario.Sampling, progress, ct)).ToList();
            return new ScenarioResults(scenario, Array.Empty<PairVibrationReport>(), siteReports);
        }
        catch (ArgumentException ex) when (ex is not ArgumentNullException)
        {
            throw new ScenarioException(new[] { $"{LandscapePath(ex.ParamName)}: {FirstSentences(ex.Message)}" });
        }
        catch (LandscapeException ex)
        {
            throw new ScenarioException(new[] { $"$.landscape: {ex.Message}" });
        }
    }

    private static System.Collections.Immutable.ImmutableArray<Position> ToImmutableArrayCompat(this IEnumerable<Position> items)
        => System.Collections.Immutable.ImmutableArray.CreateRange(items);
}
