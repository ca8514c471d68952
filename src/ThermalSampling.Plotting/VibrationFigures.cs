using System;
using System.Collections.Generic;
using System.Globalization;
using System.IO;
using System.Linq;
using MathNet.Numerics.LinearAlgebra;
using ScottPlot;
using ThermalSampling.Analysis;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Reports;

namespace ThermalSampling.Plotting;

/// <summary>
/// Figures of vibration reports, drawn with ScottPlot. Every method returns a <see cref="Plot"/> that callers may
/// restyle before saving with <see cref="Save"/>. Lengths are in Å, energies in meV, temperatures in K.
/// </summary>
public static class VibrationFigures
{
    private static readonly Color Sampled = Color.FromHex("#1f77b4");
    private static readonly Color Exact = Color.FromHex("#2ca02c");
    private static readonly Color Harmonic = Color.FromHex("#d62728");
    private static readonly Color Potential = Color.FromHex("#7f7f7f");
    private static readonly Color FirstOrder = Color.FromHex("#ff7f0e");

    /// <summary>The default figure size in pixels.</summary>
    public const int DefaultWidth = 900;

    /// <summary>The default figure size in pixels.</summary>
    public const int DefaultHeight = 560;

    /// <summary>
    /// The position distribution of a pair: the sampled histogram with error bars, the exact density, the harmonic
    /// Gaussian and, on the right axis, the potential V(r) − V_min.
    /// </summary>
    /// <typeparam name="TPotential">The potential type.</typeparam>
    /// <param name="report">The report.</param>
    /// <param name="landscape">The landscape it was sampled in (for the exact density and the potential curve).</param>
    public static Plot PositionDistribution<TPotential>(PairVibrationReport report, PairLandscape<TPotential> landscape)
        where TPotential : struct, IPairPotential
    {
        ArgumentNullException.ThrowIfNull(report);
        ArgumentNullException.ThrowIfNull(landscape);
        var exact = ExactPairDistribution.Compute(landscape, report.Temperature);
        var h = report.Histogram;
        double peak = h.Density.Max();
        // Show where the probability is: bins above 0.1% of the peak, padded by two bins.
        int first = Math.Max(0, Enumerable.Range(0, h.Density.Length).First(i => h.Density[i] > 1e-3 * peak) - 2);
        int last = Math.Min(h.Density.Length - 1, Enumerable.Range(0, h.Density.Length).Last(i => h.Density[i] > 1e-3 * peak) + 2);
        double lo = h.Lower + first * h.BinWidth, hi = h.Lower + (last + 1) * h.BinWidth;

        var plot = new Plot();
        var xs = Enumerable.Range(0, h.Density.Length).Select(h.BinCentre).ToArray();
        var sampled = plot.Add.Scatter(xs, h.Density.ToArray(), Sampled);
        sampled.LineWidth = 0;
        sampled.MarkerSize = 6;
        sampled.LegendText = "sampled (± 1 SE)";
        var bars = plot.Add.ErrorBar(xs, h.Density.ToArray(), h.DensityStandardError.ToArray());
        bars.Color = Sampled;

        var grid = Enumerable.Range(0, 400).Select(i => lo + (hi - lo) * i / 399).ToArray();
        var exactLine = plot.Add.Scatter(grid, grid.Select(exact.Density).ToArray(), Exact);
        exactLine.MarkerSize = 0;
        exactLine.LineWidth = 2;
        exactLine.LegendText = "exact (quadrature)";
        if (report.Harmonic is { } harm)
        {
            double s = harm.ClassicalRmsInAngstroms, m = harm.EquilibriumDistanceInAngstroms;
            var gauss = plot.Add.Scatter(grid, grid.Select(r => Math.Exp(-0.5 * (r - m) * (r - m) / (s * s)) / (s * Math.Sqrt(2 * Math.PI))).ToArray(), Harmonic);
            gauss.MarkerSize = 0;
            gauss.LinePattern = LinePattern.Dashed;
            gauss.LineWidth = 2;
            gauss.LegendText = "harmonic Gaussian";
        }
        double vMin = grid.Min(landscape.CheckedEnergy);
        double kt = report.Temperature.ThermalEnergyInElectronVolts;
        double vMax = 12 * kt;
        var potential = plot.Add.Scatter(grid, grid.Select(r => Math.Min((landscape.CheckedEnergy(r) - vMin), vMax) * 1e3).ToArray(), Potential);
        potential.MarkerSize = 0;
        potential.LinePattern = LinePattern.Dotted;
        potential.LineWidth = 2;
        potential.LegendText = "V(r) − V_min (right axis)";
        potential.Axes.YAxis = plot.Axes.Right;

        string geometry = report.Geometry == SeparationGeometry.Radial ? "radial pair" : "line";
        plot.Title(string.Create(CultureInfo.InvariantCulture, $"Position distribution, {geometry}, T = {report.Temperature.InKelvin:G4} K"));
        plot.XLabel("separation r (Å)");
        plot.YLabel("probability density (1/Å)");
        plot.Axes.Right.Label.Text = "V(r) − V_min (meV)";
        plot.Axes.SetLimitsX(lo, hi);
        plot.Axes.SetLimitsY(0, 1.15 * Math.Max(peak, exactLine.Data.GetLimits().Top), plot.Axes.Left);
        plot.Axes.SetLimitsY(0, vMax * 1e3 * 1.05, plot.Axes.Right);
        plot.ShowLegend(Alignment.UpperRight);
        return plot;
    }

    /// <summary>The three marginal distributions of a site report (x, y, z about the mean), with the harmonic Gaussians.</summary>
    /// <param name="report">A site report with retained draws (<see cref="Sampling.SamplingSettings.RetainedDrawsPerChain"/> above 0).</param>
    /// <exception cref="ArgumentException">When the report holds no retained draws.</exception>
    public static Plot SiteMarginals(SiteVibrationReport report)
    {
        var draws = Draws(report);
        var plot = new Plot();
        var mean = report.Mean;
        string[] names = { "x", "y", "z" };
        Color[] colors = { Sampled, Exact, FirstOrder };
        double extent = 4 * Math.Sqrt(Math.Max(report.Covariance.XX, Math.Max(report.Covariance.YY, report.Covariance.ZZ)));
        const int bins = 60;
        for (int axis = 0; axis < 3; axis++)
        {
            var counts = new double[bins];
            foreach (var p in draws)
            {
                double u = p[axis] - mean[axis];
                int b = (int)((u + extent) / (2 * extent) * bins);
                if (b >= 0 && b < bins)
                {
                    counts[b]++;
                }
            }
            double width = 2 * extent / bins;
            var xs = Enumerable.Range(0, bins).Select(b => -extent + (b + 0.5) * width).ToArray();
            var line = plot.Add.Scatter(xs, counts.Select(c => c / (draws.Count * width)).ToArray(), colors[axis]);
            line.MarkerSize = 4;
            line.LegendText = $"sampled {names[axis]}";
            double s = Math.Sqrt(report.Harmonic.ClassicalCovariance[axis, axis]);
            var g = plot.Add.Scatter(xs, xs.Select(u => Math.Exp(-0.5 * u * u / (s * s)) / (s * Math.Sqrt(2 * Math.PI))).ToArray(), colors[axis]);
            g.MarkerSize = 0;
            g.LinePattern = LinePattern.Dashed;
            g.LegendText = $"harmonic {names[axis]}";
        }
        plot.Title(string.Create(CultureInfo.InvariantCulture, $"Marginal distributions about the mean, T = {report.Temperature.InKelvin:G4} K"));
        plot.XLabel("displacement from the mean (Å)");
        plot.YLabel("probability density (1/Å)");
        plot.ShowLegend(Alignment.UpperRight);
        return plot;
    }

    /// <summary>
    /// The density of a site's draws projected on the two most spread principal directions of the sampled covariance,
    /// with the 1σ and 2σ displacement ellipses and the principal axes.
    /// </summary>
    /// <param name="report">A site report with retained draws.</param>
    /// <exception cref="ArgumentException">When the report holds no retained draws.</exception>
    public static Plot SiteProjection(SiteVibrationReport report)
    {
        var draws = Draws(report);
        var evd = report.Covariance.ToMatrix().Evd(Symmetricity.Symmetric);
        // Eigenvalues ascend: the two most spread directions are columns 2 and 1.
        var e1 = evd.EigenVectors.Column(2);
        var e2 = evd.EigenVectors.Column(1);
        double s1 = Math.Sqrt(evd.EigenValues[2].Real), s2 = Math.Sqrt(evd.EigenValues[1].Real);
        double extent = 3.5 * s1;
        const int n = 80;
        var grid = new double[n, n];
        var mean = report.Mean;
        foreach (var p in draws)
        {
            double dx = p.X - mean.X, dy = p.Y - mean.Y, dz = p.Z - mean.Z;
            double a = dx * e1[0] + dy * e1[1] + dz * e1[2];
            double b = dx * e2[0] + dy * e2[1] + dz * e2[2];
            int i = (int)((a + extent) / (2 * extent) * n), j = (int)((b + extent) / (2 * extent) * n);
            if (i >= 0 && i < n && j >= 0 && j < n)
            {
                grid[n - 1 - j, i]++;
            }
        }
        double cell = 2 * extent / n;
        for (int i = 0; i < n; i++)
        {
            for (int j = 0; j < n; j++)
            {
                grid[i, j] /= draws.Count * cell * cell;
            }
        }
        var plot = new Plot();
        var heat = plot.Add.Heatmap(grid);
        heat.Extent = new CoordinateRect(-extent, extent, -extent, extent);
        heat.Colormap = new ScottPlot.Colormaps.Viridis();
        plot.Add.ColorBar(heat).Label = "density (1/Å²)";
        foreach (double k in new[] { 1.0, 2.0 })
        {
            var ellipse = plot.Add.Ellipse(0, 0, k * s1, k * s2);
            ellipse.LineColor = Colors.White;
            ellipse.LineWidth = 1.5f;
            ellipse.LinePattern = k == 1 ? LinePattern.Solid : LinePattern.Dashed;
        }
        var axis1 = plot.Add.Line(-2 * s1, 0, 2 * s1, 0);
        axis1.LineColor = Colors.White;
        var axis2 = plot.Add.Line(0, -2 * s2, 0, 2 * s2);
        axis2.LineColor = Colors.White;
        var c = CultureInfo.InvariantCulture;
        plot.Title(string.Format(c, "Projected density, T = {0:G4} K (ellipses: 1σ, 2σ)", report.Temperature.InKelvin));
        plot.XLabel(string.Format(c, "along ({0:F2}, {1:F2}, {2:F2}), σ = {3:G3} Å", e1[0], e1[1], e1[2], s1));
        plot.YLabel(string.Format(c, "along ({0:F2}, {1:F2}, {2:F2}), σ = {3:G3} Å", e2[0], e2[1], e2[2], s2));
        plot.Axes.SetLimits(-extent, extent, -extent, extent);
        plot.Axes.SquareUnits();
        return plot;
    }

    /// <summary>
    /// RMS spread and thermal mean shift of a pair against temperature: sampled with error bars, the harmonic √(kT/k),
    /// and the first-order anharmonic curves.
    /// </summary>
    /// <param name="reports">Reports at several temperatures (any order; at least two).</param>
    public static Plot TemperatureSweep(IReadOnlyList<PairVibrationReport> reports)
    {
        var sorted = SortedByTemperature(reports, r => r.Temperature);
        double[] t = sorted.Select(r => r.Temperature.InKelvin).ToArray();
        var plot = new Plot();
        AddSeries(plot, t, sorted.Select(r => r.Rms.Value).ToArray(), sorted.Select(r => r.Rms.StandardError).ToArray(), Sampled, "RMS spread, sampled");
        if (sorted[0].Harmonic is { } h0 && sorted[0].FirstOrder is { } f0)
        {
            // The harmonic and first-order curves are closed forms in T: Var = kT/k + c·(kT)², shift = s·kT.
            // Their coefficients come from the lowest temperature's report and are drawn on a dense grid.
            double kt0 = sorted[0].Temperature.ThermalEnergyInElectronVolts;
            double k = h0.StiffnessElectronVoltsPerAngstromSquared;
            double c = (f0.VarianceInAngstromsSquared - kt0 / k) / (kt0 * kt0);
            double s = f0.MeanShiftInAngstroms / kt0;
            var dense = Enumerable.Range(0, 200).Select(i => t[^1] * (i + 1) / 200.0).ToArray();
            double KT(double kelvin) => kelvin * Units.PhysicalConstants.BoltzmannElectronVoltPerKelvin;
            AddCurve(plot, dense, dense.Select(x => Math.Sqrt(KT(x) / k)).ToArray(), Harmonic, LinePattern.Dashed, "RMS, harmonic √(kT/k)");
            AddCurve(plot, dense, dense.Select(x => Math.Sqrt(Math.Max(KT(x) / k + c * KT(x) * KT(x), 0))).ToArray(), Harmonic, LinePattern.Dotted, "RMS, first order");
            AddSeries(plot, t, sorted.Select(r => r.MeanShift!.Value).ToArray(), sorted.Select(r => r.MeanShift!.StandardError).ToArray(), FirstOrder, "mean shift, sampled");
            AddCurve(plot, dense, dense.Select(x => s * KT(x)).ToArray(), FirstOrder, LinePattern.Dotted, "mean shift, first order");
        }
        plot.Axes.SetLimitsX(0, 1.05 * t[^1]);
        plot.Title("Thermal spread and shift against temperature");
        plot.XLabel("temperature (K)");
        plot.YLabel("length (Å)");
        plot.ShowLegend(Alignment.UpperLeft);
        return plot;
    }

    /// <summary>The mean-square displacement of a site against temperature: sampled with error bars, classical and quantum harmonic.</summary>
    /// <param name="reports">Reports at several temperatures (at least two).</param>
    public static Plot TemperatureSweep(IReadOnlyList<SiteVibrationReport> reports)
    {
        var sorted = SortedByTemperature(reports, r => r.Temperature);
        double[] t = sorted.Select(r => r.Temperature.InKelvin).ToArray();
        var plot = new Plot();
        AddSeries(plot, t, sorted.Select(r => r.MeanSquareDisplacement.Value).ToArray(), sorted.Select(r => r.MeanSquareDisplacement.StandardError).ToArray(), Sampled, "MSD, sampled");
        // Classical harmonic MSD is linear in T; the quantum harmonic one needs the modes, so it is drawn through the sampled temperatures.
        double perKelvin = sorted[0].Harmonic.ClassicalMeanSquareDisplacement / t[0];
        var dense = Enumerable.Range(0, 200).Select(i => t[^1] * (i + 1) / 200.0).ToArray();
        AddCurve(plot, dense, dense.Select(x => perKelvin * x).ToArray(), Harmonic, LinePattern.Dashed, "MSD, classical harmonic");
        AddCurve(plot, t, sorted.Select(r => r.Harmonic.QuantumMeanSquareDisplacement).ToArray(), Exact, LinePattern.Dotted, "MSD, quantum harmonic");
        plot.Axes.SetLimitsX(0, 1.05 * t[^1]);
        plot.Title("Mean-square displacement against temperature");
        plot.XLabel("temperature (K)");
        plot.YLabel("mean-square displacement (Å²)");
        plot.ShowLegend(Alignment.UpperLeft);
        return plot;
    }

    /// <summary>Saves a figure as PNG or SVG, chosen by the file extension (.png or .svg).</summary>
    /// <param name="plot">The figure.</param>
    /// <param name="path">The file; its extension must be .png or .svg.</param>
    /// <param name="width">Width in pixels, 100 to 10 000.</param>
    /// <param name="height">Height in pixels, 100 to 10 000.</param>
    public static void Save(Plot plot, string path, int width = DefaultWidth, int height = DefaultHeight)
    {
        ArgumentNullException.ThrowIfNull(plot);
        ArgumentException.ThrowIfNullOrWhiteSpace(path);
        if (width is < 100 or > 10_000 || height is < 100 or > 10_000)
        {
            throw new ArgumentOutOfRangeException(nameof(width), $"width × height = {width} × {height}; each must be from 100 to 10000 pixels.");
        }
        string extension = Path.GetExtension(path).ToLowerInvariant();
        switch (extension)
        {
            case ".png":
                plot.SavePng(path, width, height);
                break;
            case ".svg":
                plot.SaveSvg(path, width, height);
                break;
            default:
                throw new ArgumentException($"path '{path}' ends in '{extension}'; figures are saved as .png or .svg.", nameof(path));
        }
    }

    private static T[] SortedByTemperature<T>(IReadOnlyList<T> reports, Func<T, Units.Temperature> temperature)
    {
        ArgumentNullException.ThrowIfNull(reports, nameof(reports));
        if (reports.Count < 2)
        {
            throw new ArgumentException($"reports has {reports.Count} entries; a sweep figure needs at least 2 temperatures.", nameof(reports));
        }
        return reports.OrderBy(r => temperature(r).InKelvin).ToArray();
    }

    private static IReadOnlyList<Position> Draws(SiteVibrationReport report)
    {
        ArgumentNullException.ThrowIfNull(report);
        var draws = report.Draws.Chains.SelectMany(c => c).ToList();
        if (draws.Count == 0)
        {
            throw new ArgumentException("the report holds no retained draws; sample with SamplingSettings.RetainedDrawsPerChain above 0 to draw site figures.", nameof(report));
        }
        return draws;
    }

    private static void AddSeries(Plot plot, double[] x, double[] y, double[] error, Color color, string label)
    {
        var s = plot.Add.Scatter(x, y, color);
        s.LineWidth = 0;
        s.MarkerSize = 7;
        s.LegendText = label;
        var e = plot.Add.ErrorBar(x, y, error);
        e.Color = color;
    }

    private static void AddCurve(Plot plot, double[] x, double[] y, Color color, LinePattern pattern, string label)
    {
        if (y.Any(double.IsNaN))
        {
            return;
        }
        var s = plot.Add.Scatter(x, y, color);
        s.MarkerSize = 0;
        s.LineWidth = 2;
        s.LinePattern = pattern;
        s.LegendText = label;
    }
}
