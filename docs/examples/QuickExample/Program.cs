// An invented scenario (not data): an argon-like atom (39.948 u) held by one Lennard-Jones partner
// (well depth 0.0103 eV, r0 = 3.82 Å) on a line between walls at 3.2 and 6.0 Å, and the same atom
// at the hollow site of an invented fcc(111) surface with the same pair potential.
using System;
using System.Globalization;
using ThermalSampling.Analysis;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Units;

CultureInfo.DefaultThreadCurrentCulture = CultureInfo.InvariantCulture;
CultureInfo.CurrentCulture = CultureInfo.InvariantCulture;

var pair = LennardJones.FromMinimum(Length.FromAngstroms(3.82), Energy.FromElectronVolts(0.0103));
var mass = Mass.FromAtomicMassUnits(39.948);
var line = PairLandscape.Line(pair, Length.FromAngstroms(3.2), Length.FromAngstroms(6.0));

Console.WriteLine("ThermalSampling quick example (invented scenario)");
Console.WriteLine($"Line landscape: {line.Description}");
Console.WriteLine();
Console.WriteLine("   T/K   <r>-r0 exact/Å  first order/Å   RMS exact/Å  RMS harmonic/Å  RMS quantum/Å  skewness  wall mass");
foreach (double kelvin in new[] { 2.0, 5, 10, 20, 40 })
{
    var t = Temperature.FromKelvin(kelvin);
    var exact = ExactPairDistribution.Compute(line, t);
    var first = PairAnalysis.FirstOrder(line, t);
    var harmonic = PairAnalysis.Harmonic(line, mass, t);
    Console.WriteLine($"{kelvin,6:F1} {exact.MeanInAngstroms - 3.82,16:F5} {first.MeanShiftInAngstroms,14:F5} {exact.RmsInAngstroms,13:F5} {harmonic.ClassicalRmsInAngstroms,15:F5} {harmonic.QuantumRmsInAngstroms,14:F5} {exact.Skewness,9:F3} {exact.WallMass,10:E2}");
    var validity = ClassicalValidity.AssessPair(line, mass, t);
    foreach (var w in validity.Warnings)
    {
        Console.WriteLine($"        warning [{w.Code}]: {w.Message}");
    }
}

Console.WriteLine();
var surface = LatticeSites.FccSurface(SurfaceFacet.Fcc111, AdsorptionSiteKind.Hollow, Length.FromAngstroms(3.82));
var site = SiteLandscape.Create(pair, surface.Sites, surface.Start, Confinement.Sphere(Length.FromAngstroms(1.5)));
Console.WriteLine($"Surface site: {site.Description}");
var h = SiteAnalysis.Harmonic(site, mass, Temperature.FromKelvin(20));
Console.WriteLine($"  minimum {h.Minimum}, energy {h.MinimumEnergyInElectronVolts:F4} eV");
Console.WriteLine($"  classical covariance at 20 K (Å²): {h.ClassicalCovariance}");
Console.WriteLine($"  MSD classical {h.ClassicalMeanSquareDisplacement:F5} Å², quantum {h.QuantumMeanSquareDisplacement:F5} Å²; B classical {h.ClassicalDebyeWallerB:F3} Å², quantum {h.QuantumDebyeWallerB:F3} Å²");
Console.WriteLine($"  first-order mean shift {h.FirstOrderMeanShift}");
