using System;
using MathNet.Numerics.RootFinding;

namespace ThermalSampling.Potentials;

/// <summary>
/// Locates minima of a pair potential numerically: a scan for sign changes of V′ followed by
/// Brent's method (MathNet.Numerics) on V′, keeping the lowest minimum found.
/// </summary>
internal static class WellLocator
{
    internal static double? FindLowestMinimum(Func<double, double> energy, Func<double, double> firstDerivative,
        double lower, double upper, int scanPoints = 4000)
    {
        double? best = null;
        double bestEnergy = double.PositiveInfinity;
        double step = (upper - lower) / scanPoints;
        double prevR = lower;
        double prevD = firstDerivative(prevR);
        for (int i = 1; i <= scanPoints; i++)
        {
            double r = lower + i * step;
            double d = firstDerivative(r);
            if (double.IsFinite(prevD) && double.IsFinite(d) && prevD < 0 && d >= 0)
            {
                double root = d == 0 ? r : Brent.FindRoot(firstDerivative, prevR, r, 1e-13 * Math.Max(1, r), 200);
                double e = energy(root);
                if (e < bestEnergy)
                {
                    bestEnergy = e;
                    best = root;
                }
            }
            prevR = r;
            prevD = d;
        }
        return best;
    }
}
