using System;
using System.Runtime.Intrinsics;
using ThermalSampling.Numerics;
using ThermalSampling.Potentials;
using ThermalSampling.Units;
using Xunit;

namespace ThermalSampling.Tests;

/// <summary>
/// Every potential's lane form against its scalar form, lane by lane, at every width: the wrappers compose their inner
/// lane forms (cut-off, shifted cut-off, sum), and lanes beyond a cut-off are exactly 0. Invented parameters.
/// </summary>
public class LaneFormTests
{
    private static readonly LennardJones Lj = LennardJones.FromMinimum(Length.FromAngstroms(3.0), Energy.FromElectronVolts(0.02));
    private static readonly HarmonicBond Bond = new(3.0, Length.FromAngstroms(2.5));

    private static void AgreesAtEveryWidth<TPotential>(TPotential p, double[] r, double relative)
        where TPotential : struct, IPairPotential
    {
        for (int i = 0; i + 8 <= r.Length; i += 8)
        {
            var v8 = Vector512.Create(r.AsSpan(i, 8));
            var e8 = p.LaneEnergy<Lanes8, Vector512<double>, Vector512<ulong>>(v8);
            var q8 = p.LaneEnergyAtSquaredDistance<Lanes8, Vector512<double>, Vector512<ulong>>(v8 * v8);
            var e4 = p.LaneEnergy<Lanes4, Vector256<double>, Vector256<ulong>>(Vector256.Create(r.AsSpan(i, 4)));
            var e2 = p.LaneEnergy<Lanes2, Vector128<double>, Vector128<ulong>>(Vector128.Create(r.AsSpan(i, 2)));
            for (int lane = 0; lane < 8; lane++)
            {
                double x = r[i + lane];
                double scalar = p.Energy(x);
                double one = p.LaneEnergy<Lanes1, double, ulong>(x);
                Assert.Equal(one, e8.GetElement(lane)); // widths agree bit for bit
                Assert.Equal(p.LaneEnergyAtSquaredDistance<Lanes1, double, ulong>(x * x), q8.GetElement(lane));
                if (lane < 4)
                {
                    Assert.Equal(one, e4.GetElement(lane));
                }
                if (lane < 2)
                {
                    Assert.Equal(one, e2.GetElement(lane));
                }
                Assert.True(Math.Abs(one - scalar) <= relative * Math.Max(1e-3, Math.Abs(scalar)), $"{p.Description} at r = {x}: lane {one}, scalar {scalar}");
            }
        }
    }

    private static double[] Grid(double lo, double hi)
    {
        var r = new double[64];
        for (int i = 0; i < r.Length; i++)
        {
            r[i] = lo + (hi - lo) * i / (r.Length - 1);
        }
        return r;
    }

    [Fact]
    public void WrappersComposeTheirInnerLaneForms()
    {
        var cut = new CutOffPotential<LennardJones>(Lj, Length.FromAngstroms(6.0));
        var shifted = new ShiftedCutOffPotential<Morse>(new Morse(Energy.FromElectronVolts(0.3), 1.4, Length.FromAngstroms(2.6)), Length.FromAngstroms(5.0));
        var sum = new SumPotential<LennardJones, HarmonicBond>(Lj, Bond);
        AgreesAtEveryWidth(cut, Grid(2.6, 8.0), 0);          // Lennard-Jones lane and scalar forms are the same operations
        AgreesAtEveryWidth(shifted, Grid(1.8, 7.0), 1e-13);  // LaneMath.Exp against Math.Exp
        AgreesAtEveryWidth(sum, Grid(2.6, 4.0), 0);
        var beyond = cut.LaneEnergy<Lanes8, Vector512<double>, Vector512<ulong>>(Vector512.Create(6.0, 6.5, 7, 8, 100, 1e6, 6.000001, 5.999999));
        for (int lane = 0; lane < 7; lane++)
        {
            Assert.Equal(0.0, beyond.GetElement(lane));
        }
        Assert.NotEqual(0.0, beyond.GetElement(7));
    }

    [Fact]
    public void APotentialWithoutAVectorFormIsCalledLaneByLane()
    {
        var f = new FunctionPotential(r => 0.5 * (r - 2) * (r - 2), Length.FromAngstroms(0.5), Length.FromAngstroms(9), description: "invented quadratic");
        AgreesAtEveryWidth(f, Grid(0.5, 9.0), 0);
    }
}
