using System;

namespace ThermalSampling.Tests;

/// <summary>Plain central finite differences written in the test project, independent of the library and of MathNet's stencils.</summary>
internal static class FiniteDifference
{
    public static double First(Func<double, double> f, double x, double h) => (f(x - 2 * h) - 8 * f(x - h) + 8 * f(x + h) - f(x + 2 * h)) / (12 * h);

    public static double RelativeError(double actual, double expected, double floor)
        => Math.Abs(actual - expected) / Math.Max(Math.Abs(expected), floor);
}
