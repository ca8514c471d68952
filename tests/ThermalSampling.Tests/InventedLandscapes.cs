using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Units;

namespace ThermalSampling.Tests;

/// <summary>
/// Invented landscapes several test classes share: a Lennard-Jones pair (well 10 meV at 3.5 Å) and the cage of twelve such
/// neighbours 3.5 Å away (the fcc nearest-neighbour shell), confined to a sphere of 1.2 Å.
/// </summary>
internal static class InventedLandscapes
{
    internal static readonly LennardJones Pair = LennardJones.FromMinimum(Length.FromAngstroms(3.5), Energy.FromElectronVolts(0.010));

    internal static readonly SiteLandscape<LennardJones> Cage = SiteLandscape.Create(Pair,
        LatticeSites.NeighbourCage(LatticeKind.FaceCentredCubic, Length.FromAngstroms(3.5)), Position.Origin, Confinement.Sphere(Length.FromAngstroms(1.2)));
}
