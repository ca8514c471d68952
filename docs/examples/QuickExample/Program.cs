// An invented scenario (not data; round, made-up parameters, no published set): an atom of 50 u held by one
// Lennard-Jones partner (well depth ε = 0.015 eV, minimum at r_min = 3.5 Å) on a line between walls at 3.0 and 6.0 Å,
// and the same atom in the 12-neighbour cage of an invented fcc crystal with nearest-neighbour distance 3.5 Å.
using System;
using System.Globalization;
using ThermalSampling;
using ThermalSampling.Analysis;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Sampling;
using ThermalSampling.Units;

CultureInfo.CurrentCulture = CultureInfo.InvariantCulture;

var pair = LennardJones.FromMinimum(Length.FromAngstroms(3.5), Energy.FromElectronVolts(0.015));
var mass = Mass.FromAtomicMassUnits(50);
var line = PairLandscape.Line(pair, Length.FromAngstroms(3.0), Length.FromAngstroms(6.0));
var settings = new SamplingSettings { Seed = 2026, Chains = 4, SamplesPerChain = 100_000, BurnIn = 10_000 };

Console.WriteLine("ThermalSampling quick example (invented scenario)");
Console.WriteLine($"Line landscape: {line.Description}");
Console.WriteLine($"Sampling: Metropolis, {settings.Chains} chains x {settings.SamplesPerChain} draws, seed {settings.Seed}");
Console.WriteLine();
Console.WriteLine("   T/K   shift sampled/Å       shift exact/Å  first order/Å   RMS sampled/Å        RMS harm./Å  RMS quant./Å  z(mean)  R-hat");
foreach (double kelvin in new[] { 2.0, 5, 10, 20, 40 })
{
    var t = Temperature.FromKelvin(kelvin);
    var r = PairSampler.Run(line, mass, t, settings);
    Console.WriteLine($"{kelvin,6:F1} {r.MeanShift!.Value,9:F5} ± {r.MeanShift.StandardError,-7:F5} {r.Exact.Mean - 3.5,12:F5} {r.FirstOrder!.MeanShiftInAngstroms,14:F5} {r.Rms.Value,9:F5} ± {r.Rms.StandardError,-7:F5} {r.Harmonic!.ClassicalRmsInAngstroms,12:F5} {r.Harmonic.QuantumRmsInAngstroms,12:F5} {r.Exact.ZScoreMean,8:F2} {r.Diagnostics.RHat,6:F4}");
    foreach (var w in r.Warnings)
    {
        Console.WriteLine($"        warning [{w.Code}]: {w.Message}");
    }
}

Console.WriteLine();
var cage = SiteLandscape.Create(pair, LatticeSites.NeighbourCage(LatticeKind.FaceCentredCubic, Length.FromAngstroms(3.5)),
    Position.Origin, Confinement.Sphere(Length.FromAngstroms(1.5)));
Console.WriteLine($"Site landscape: {cage.Description}");
var site = SiteSampler.Run(cage, mass, Temperature.FromKelvin(20), settings with { SamplesPerChain = 50_000 });
Console.WriteLine($"  20 K: MSD {site.MeanSquareDisplacement.Value:F5} ± {site.MeanSquareDisplacement.StandardError:F5} Å² (harmonic {site.Harmonic.ClassicalMeanSquareDisplacement:F5}, quantum harmonic {site.Harmonic.QuantumMeanSquareDisplacement:F5})");
Console.WriteLine(site.DebyeWallerB is { } b
    ? $"  B = {b.Value:F3} ± {b.StandardError:F3} Å²; covariance (Å²) {site.Covariance}"
    : $"  the atom left its site: no B factor; covariance of where it went (Å²) {site.Covariance}");
Console.WriteLine($"  acceptance {site.Diagnostics.AcceptanceRate:P1}, ESS {site.Diagnostics.EffectiveSampleSize:F0}, R-hat {site.Diagnostics.RHat:F4}");
foreach (var w in site.Warnings)
{
    Console.WriteLine($"  warning [{w.Code}]: {w.Message}");
}
