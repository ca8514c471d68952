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

/// <summary>The units a figure is drawn in: lengths per <see cref="AngstromsPerUnit"/> Å, energies per <see cref="ElectronVoltsPerUnit"/> eV.</summary>
/// <param name="LengthName">The length unit as printed, for example "Å" or "nm".</param>
/// <param name="AngstromsPerUnit">Å in one length unit.</param>
/// <param name="EnergyName">The energy unit as printed, for example "meV".</param>
/// <param name="ElectronVoltsPerUnit">eV in one energy unit.</param>
public sealed record FigureUnits(string LengthName, double AngstromsPerUnit, string EnergyName, double ElectronVoltsPerUnit)
{
    /// <summary>Å and meV.</summary>
    public static FigureUnits Default { get; } = new("Å", 1, "meV", 1e-3);
}

/// <summary>
/// Figures of vibration reports, drawn with ScottPlot. Every method returns a <see cref="Plot"/> that callers may
/// restyle before saving with <see cref="Save"/>. Lengths and energies are in the <see cref="FigureUnits"/> given (Å and meV
/// by default), temperatures in K.
/// </summary>
public static class VibrationFigures
{
    private static readonly Color Sampled = Color.FromHex("#1f77b4");
    private static readonly Color Exact = Color.FromHex("#2ca02c");
    private static readonly Color Harmonic = Color.FromHex("#d62728");
    private static readonly Color Potential = Color.FromHex("#7f7f7f");
    private static readonly Color FirstOrder = Color.FromHex("#ff7f0e");
    private static readonly Color Quantum = Color.FromHex("#9467bd");
    private static readonly Color[] Axes3 = [Color.FromHex("#17becf"), Color.FromHex("#8c564b"), Color.FromHex("#e377c2")]; // x, y, z: none of the line figure's colours

    /// <summary>Ellipse levels of the projection: the share of a two-dimensional Gaussian each encloses.</summary>
    private static readonly double[] EnclosedShares = [0.5, 0.9];

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
    /// <param name="context">A line shown under the title, such as the scenario's title (say "invented" where it is); none when null.</param>
    /// <param name="units">The units to draw in; Å and meV when null.</param>
    public static Plot PositionDistribution<TPotential>(PairVibrationReport report, PairLandscape<TPotential> landscape, string? context = null,
        FigureUnits? units = null)
        where TPotential : struct, IPairPotential
    {
        var u = units ?? FigureUnits.Default;
        double L = u.AngstromsPerUnit;
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
        var xs = Enumerable.Range(0, h.Density.Length).Select(i => h.BinCentre(i) / L).ToArray();
        var sampled = plot.Add.Scatter(xs, h.Density.Select(d => d * L).ToArray(), Sampled);
        sampled.LineWidth = 0;
        sampled.MarkerSize = 6;
        sampled.LegendText = "sampled (± 1 SE)";
        var bars = plot.Add.ErrorBar(xs, h.Density.Select(d => d * L).ToArray(), h.DensityStandardError.Select(d => d * L).ToArray());
        bars.Color = Sampled;

        var grid = Enumerable.Range(0, 400).Select(i => lo + (hi - lo) * i / 399).ToArray();
        var gridU = grid.Select(r => r / L).ToArray();
        var exactLine = plot.Add.Scatter(gridU, grid.Select(r => exact.Density(r) * L).ToArray(), Exact);
        exactLine.MarkerSize = 0;
        exactLine.LineWidth = 2;
        exactLine.LegendText = "exact (quadrature)";
        if (report.Harmonic is { } harm)
        {
            double s = harm.ClassicalRmsInAngstroms, m = harm.EquilibriumDistanceInAngstroms;
            var gauss = plot.Add.Scatter(gridU, grid.Select(r => L * Math.Exp(-0.5 * (r - m) * (r - m) / (s * s)) / (s * Math.Sqrt(2 * Math.PI))).ToArray(), Harmonic);
            gauss.MarkerSize = 0;
            gauss.LinePattern = LinePattern.Dashed;
            gauss.LineWidth = 2;
            gauss.LegendText = "harmonic Gaussian";
            if (HasQuantumWarning(report.Warnings))
            {
                double q = harm.QuantumRmsInAngstroms;
                var quantum = plot.Add.Scatter(gridU, grid.Select(r => L * Math.Exp(-0.5 * (r - m) * (r - m) / (q * q)) / (q * Math.Sqrt(2 * Math.PI))).ToArray(), Quantum);
                quantum.MarkerSize = 0;
                quantum.LinePattern = LinePattern.DenselyDashed;
                quantum.LineWidth = 2;
                quantum.LegendText = "quantum harmonic Gaussian";
            }
        }
        double quantumPeak = AddQuantumExact(plot, report, L);
        double vMin = grid.Min(landscape.CheckedEnergy);
        double kt = report.Temperature.ThermalEnergyInElectronVolts;
        double vMax = 12 * kt;
        var potential = plot.Add.Scatter(gridU, grid.Select(r => Math.Min((landscape.CheckedEnergy(r) - vMin), vMax) / u.ElectronVoltsPerUnit).ToArray(), Potential);
        potential.MarkerSize = 0;
        potential.LinePattern = LinePattern.Dotted;
        potential.LineWidth = 2;
        potential.LegendText = "V(r) − V_min (right axis)";
        potential.Axes.YAxis = plot.Axes.Right;

        string geometry = report.Geometry == SeparationGeometry.Radial ? "radial pair" : "line";
        Title(plot, string.Create(CultureInfo.InvariantCulture, $"Position distribution, {geometry}, T = {report.Temperature.InKelvin:G4} K"), context, report.Warnings);
        plot.XLabel($"separation r ({u.LengthName})");
        plot.YLabel($"probability density (1/{u.LengthName})");
        plot.Axes.Right.Label.Text = $"V(r) − V_min ({u.EnergyName})";
        plot.Axes.SetLimitsX(lo / L, hi / L);
        plot.Axes.SetLimitsY(0, 1.15 * Math.Max(Math.Max(peak * L, exactLine.Data.GetLimits().Top), quantumPeak), plot.Axes.Left);
        plot.Axes.SetLimitsY(0, vMax / u.ElectronVoltsPerUnit * 1.05, plot.Axes.Right);
        plot.ShowLegend(Alignment.UpperRight);
        return plot;
    }

    /// <summary>
    /// The sampled distribution of a pair from its report alone: the histogram with error bars, the harmonic Gaussian and,
    /// when the quantum warning fires, the quantum-harmonic one. (With the landscape, <see cref="PositionDistribution{TPotential}"/>
    /// adds the exact density and the potential.)
    /// </summary>
    /// <param name="report">The report.</param>
    /// <param name="context">A line shown under the title; none when null.</param>
    /// <param name="units">The units to draw in; Å when null.</param>
    public static Plot SampledDistribution(PairVibrationReport report, string? context = null, FigureUnits? units = null)
    {
        ArgumentNullException.ThrowIfNull(report);
        var u = units ?? FigureUnits.Default;
        double L = u.AngstromsPerUnit;
        var h = report.Histogram;
        var plot = new Plot();
        var xs = Enumerable.Range(0, h.Density.Length).Select(i => h.BinCentre(i) / L).ToArray();
        var ys = h.Density.Select(d => d * L).ToArray();
        var sampled = plot.Add.Scatter(xs, ys, Sampled);
        sampled.LineWidth = 0;
        sampled.MarkerSize = 6;
        sampled.LegendText = "sampled (± 1 SE)";
        plot.Add.ErrorBar(xs, ys, h.DensityStandardError.Select(d => d * L).ToArray()).Color = Sampled;
        if (report.Harmonic is { } harm)
        {
            var grid = Enumerable.Range(0, 400).Select(i => h.Lower + (h.Upper - h.Lower) * i / 399).ToArray();
            void Gaussian(double s, Color color, LinePattern pattern, string label)
            {
                double m = harm.EquilibriumDistanceInAngstroms;
                var line = plot.Add.Scatter(grid.Select(r => r / L).ToArray(), grid.Select(r => L * Math.Exp(-0.5 * (r - m) * (r - m) / (s * s)) / (s * Math.Sqrt(2 * Math.PI))).ToArray(), color);
                line.MarkerSize = 0;
                line.LineWidth = 2;
                line.LinePattern = pattern;
                line.LegendText = label;
            }
            Gaussian(harm.ClassicalRmsInAngstroms, Harmonic, LinePattern.Dashed, "harmonic Gaussian");
            if (HasQuantumWarning(report.Warnings))
            {
                Gaussian(harm.QuantumRmsInAngstroms, Quantum, LinePattern.DenselyDashed, "quantum harmonic Gaussian");
            }
        }
        AddQuantumExact(plot, report, L);
        Title(plot, string.Create(CultureInfo.InvariantCulture, $"Sampled distribution, T = {report.Temperature.InKelvin:G4} K"), context, report.Warnings);
        plot.XLabel($"separation r ({u.LengthName})");
        plot.YLabel($"probability density (1/{u.LengthName})");
        plot.ShowLegend(Alignment.UpperRight);
        return plot;
    }

    /// <summary>
    /// The three marginal densities of a site report along its principal axes (<see cref="SiteVibrationReport.Distribution"/>:
    /// the same numbers as the report and the JSON document), with their standard errors and, dashed, the harmonic
    /// Gaussian along each axis (dotted: the quantum harmonic one, where quantum effects are flagged).
    /// </summary>
    /// <param name="report">A site report.</param>
    /// <param name="context">A line shown under the title, such as the scenario's title; none when null.</param>
    /// <param name="units">The units to draw in; Å when null.</param>
    public static Plot SiteMarginals(SiteVibrationReport report, string? context = null, FigureUnits? units = null)
    {
        ArgumentNullException.ThrowIfNull(report);
        var unit = units ?? FigureUnits.Default;
        double L = unit.AngstromsPerUnit;
        var d = report.Distribution;
        var plot = new Plot();
        var colors = Axes3;
        bool quantum = HasQuantumWarning(report.Warnings);
        for (int axis = 0; axis < 3; axis++)
        {
            var h = d.Marginals[axis];
            var e = d.PrincipalAxes[axis];
            var xsA = Enumerable.Range(0, h.Density.Length).Select(h.BinCentre).ToArray();
            var xs = xsA.Select(x => x / L).ToArray();
            string name = string.Create(CultureInfo.InvariantCulture, $"axis {axis + 1} {Direction(Vector<double>.Build.Dense([e.X, e.Y, e.Z]))}");
            var line = plot.Add.Scatter(xs, h.Density.Select(p => p * L).ToArray(), colors[axis]);
            line.MarkerSize = 4;
            line.LineWidth = 0;
            line.LegendText = $"sampled, {name} (± 1 SE)";
            var errors = plot.Add.ErrorBar(xs, h.Density.Select(p => p * L).ToArray(), h.DensityStandardError.Select(p => p * L).ToArray());
            errors.Color = colors[axis];
            // The harmonic Gaussian along the axis: variance eᵀΣe, centred on the minimum's coordinate e·(x_min − centre).
            double centre = Dot(e, report.Minimum - d.Centre);
            double s = Math.Sqrt(report.Harmonic.ClassicalCovariance.Quadratic(e));
            var g = plot.Add.Scatter(xs, xsA.Select(u => L * Gaussian(u - centre, s)).ToArray(), colors[axis]);
            g.MarkerSize = 0;
            g.LinePattern = LinePattern.Dashed;
            g.LegendText = $"harmonic, axis {axis + 1}";
            if (quantum)
            {
                double q = Math.Sqrt(report.Harmonic.QuantumCovariance.Quadratic(e));
                var qg = plot.Add.Scatter(xs, xsA.Select(u => L * Gaussian(u - centre, q)).ToArray(), colors[axis]);
                qg.MarkerSize = 0;
                qg.LinePattern = LinePattern.Dotted;
                qg.LegendText = $"quantum harmonic, axis {axis + 1}";
            }
        }
        Title(plot, string.Create(CultureInfo.InvariantCulture, $"Marginal distributions along the principal axes, T = {report.Temperature.InKelvin:G4} K"), context, report.Warnings);
        plot.XLabel($"displacement from the predicted mean ({unit.LengthName})");
        plot.YLabel($"probability density (1/{unit.LengthName})");
        plot.ShowLegend(Alignment.UpperRight);
        return plot;
    }

    private static double Gaussian(double u, double sigma) => Math.Exp(-0.5 * u * u / (sigma * sigma)) / (sigma * Math.Sqrt(2 * Math.PI));

    private static double Dot(Position a, Position b) => a.X * b.X + a.Y * b.Y + a.Z * b.Z;

    /// <summary>
    /// The density of a site's draws projected on the plane of its two largest principal axes
    /// (<see cref="SiteDistribution.Projection"/>: the report's own numbers), with the ellipses that enclose 50 % and 90 %
    /// of a Gaussian of the sampled covariance in that plane, about the sampled mean.
    /// </summary>
    /// <param name="report">A site report.</param>
    /// <param name="context">A line shown under the title, such as the scenario's title; none when null.</param>
    /// <param name="units">The units to draw in; Å when null.</param>
    public static Plot SiteProjection(SiteVibrationReport report, string? context = null, FigureUnits? units = null)
    {
        ArgumentNullException.ThrowIfNull(report);
        var unit = units ?? FigureUnits.Default;
        double L = unit.AngstromsPerUnit;
        var d = report.Distribution;
        var p = d.Projection;
        var (e1, e2) = (d.PrincipalAxes[0], d.PrincipalAxes[1]);
        int n = p.Side;
        var grid = new double[n, n];
        for (int i = 0; i < n; i++)
        {
            for (int j = 0; j < n; j++)
            {
                grid[n - 1 - j, i] = p.At(i, j) * L * L; // rows from the top: the second axis upwards
            }
        }
        var plot = new Plot();
        var heat = plot.Add.Heatmap(grid);
        heat.Extent = new CoordinateRect(p.FirstLower / L, p.FirstUpper / L, p.SecondLower / L, p.SecondUpper / L);
        heat.Colormap = new ScottPlot.Colormaps.Viridis();
        plot.Add.ColorBar(heat).Label = $"density (1/{unit.LengthName}²)";
        // The sampled covariance in the plane, and its ellipses about the sampled mean.
        var c = report.Covariance;
        double s11 = c.Quadratic(e1), s22 = c.Quadratic(e2), s12 = 0.5 * (c.Quadratic(e1 + e2) - s11 - s22);
        double half = 0.5 * (s11 + s22), gap = Math.Sqrt(0.25 * (s11 - s22) * (s11 - s22) + s12 * s12);
        double major = Math.Sqrt(half + gap), minor = Math.Sqrt(Math.Max(half - gap, 0));
        double angle = 0.5 * Math.Atan2(2 * s12, s11 - s22);
        var offset = report.Mean - d.Centre;
        double m1 = Dot(offset, e1), m2 = Dot(offset, e2);
        foreach (double share in EnclosedShares)
        {
            double k = Math.Sqrt(-2 * Math.Log(1 - share)); // a 2D Gaussian holds 1 − e^(−k²/2) inside k σ
            var ellipse = plot.Add.Ellipse(m1 / L, m2 / L, k * major / L, k * minor / L, ScottPlot.Angle.FromRadians(angle));
            ellipse.LineColor = Colors.White;
            ellipse.LineWidth = 1.5f;
            ellipse.LinePattern = share < 0.75 ? LinePattern.Solid : LinePattern.Dashed;
            var label = plot.Add.Text(string.Create(CultureInfo.InvariantCulture, $"{share:P0}"), (m1 + k * major * 0.72 * Math.Cos(angle)) / L,
                (m2 + k * major * 0.72 * Math.Sin(angle)) / L);
            label.LabelFontColor = Colors.White;
            label.LabelFontSize = 13;
        }
        var ci = CultureInfo.InvariantCulture;
        Title(plot, string.Format(ci, "Projected density, T = {0:G4} K (ellipses hold 50 % and 90 % of a Gaussian in this plane)", report.Temperature.InKelvin), context, report.Warnings);
        plot.XLabel(string.Format(ci, "along {0}, σ = {1:G3} {2}", Direction(Vector<double>.Build.Dense([e1.X, e1.Y, e1.Z])), Math.Sqrt(s11) / L, unit.LengthName));
        plot.YLabel(string.Format(ci, "along {0}, σ = {1:G3} {2}", Direction(Vector<double>.Build.Dense([e2.X, e2.Y, e2.Z])), Math.Sqrt(s22) / L, unit.LengthName));
        plot.Axes.SetLimits(p.FirstLower / L, p.FirstUpper / L, p.SecondLower / L, p.SecondUpper / L);
        plot.Axes.SquareUnits();
        return plot;
    }

    /// <summary>
    /// RMS spread and thermal mean shift of a pair against temperature: sampled with error bars, the harmonic √(kT/k),
    /// and the first-order anharmonic curves.
    /// </summary>
    /// <param name="reports">Reports at several temperatures (any order; at least two).</param>
    /// <param name="context">A line shown under the title, such as the scenario's title; none when null.</param>
    /// <param name="units">The units to draw in; Å when null.</param>
    public static Plot TemperatureSweep(IReadOnlyList<PairVibrationReport> reports, string? context = null, FigureUnits? units = null)
    {
        var unit = units ?? FigureUnits.Default;
        double L = unit.AngstromsPerUnit;
        var sorted = SortedByTemperature(reports, r => r.Temperature);
        double[] t = sorted.Select(r => r.Temperature.InKelvin).ToArray();
        var plot = new Plot();
        AddSeries(plot, t, sorted.Select(r => r.Rms.Value / L).ToArray(), sorted.Select(r => r.Rms.StandardError / L).ToArray(), Sampled, "RMS spread, sampled");
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
            AddCurve(plot, dense, dense.Select(x => Math.Sqrt(KT(x) / k) / L).ToArray(), Harmonic, LinePattern.Dashed, "RMS, harmonic √(kT/k)");
            AddCurve(plot, dense, dense.Select(x => Math.Sqrt(Math.Max(KT(x) / k + c * KT(x) * KT(x), 0)) / L).ToArray(), Harmonic, LinePattern.Dotted, "RMS, first order");
            double zeroPoint = h0.ZeroPointVarianceInAngstromsSquared, hw = h0.QuantumEnergyInElectronVolts;
            AddCurve(plot, dense, dense.Select(x => Math.Sqrt(zeroPoint / Math.Tanh(0.5 * hw / KT(x))) / L).ToArray(), Quantum, LinePattern.DenselyDashed, "RMS, quantum harmonic");
            AddPoints(plot, sorted.Where(r => r.QuantumExact is not null).Select(r => (r.Temperature.InKelvin, r.QuantumExact!.RmsInAngstroms / L)), "RMS, exact quantum (grid)");
            AddSeries(plot, t, sorted.Select(r => r.MeanShift!.Value / L).ToArray(), sorted.Select(r => r.MeanShift!.StandardError / L).ToArray(), FirstOrder, "mean shift, sampled");
            AddCurve(plot, dense, dense.Select(x => s * KT(x) / L).ToArray(), FirstOrder, LinePattern.Dotted, "mean shift, first order");
        }
        plot.Axes.SetLimitsX(0, 1.05 * t[^1]);
        Title(plot, "Thermal spread and shift against temperature", context, sorted.SelectMany(r => r.Warnings).ToList());
        plot.XLabel("temperature (K)");
        plot.YLabel($"length ({unit.LengthName})");
        plot.ShowLegend(Alignment.UpperLeft);
        return plot;
    }

    /// <summary>The mean-square displacement of a site against temperature: sampled with error bars, classical and quantum harmonic.</summary>
    /// <param name="reports">Reports at several temperatures (at least two).</param>
    /// <param name="context">A line shown under the title, such as the scenario's title; none when null.</param>
    /// <param name="units">The units to draw in; Å when null.</param>
    public static Plot TemperatureSweep(IReadOnlyList<SiteVibrationReport> reports, string? context = null, FigureUnits? units = null)
    {
        var unit = units ?? FigureUnits.Default;
        double L2 = unit.AngstromsPerUnit * unit.AngstromsPerUnit;
        var sorted = SortedByTemperature(reports, r => r.Temperature);
        double[] t = sorted.Select(r => r.Temperature.InKelvin).ToArray();
        var plot = new Plot();
        AddSeries(plot, t, sorted.Select(r => r.MeanSquareDisplacement.Value / L2).ToArray(), sorted.Select(r => r.MeanSquareDisplacement.StandardError / L2).ToArray(), Sampled, "MSD, sampled");
        // Both harmonic curves are closed forms in T, drawn smooth: classical MSD = Σ kT/k_i, quantum MSD = Σ z_i coth(ħω_i/2kT)
        // with z_i = ħ/(2mω_i) the zero-point variance of mode i (recovered from the lowest temperature's modes).
        var modes = sorted[0].Harmonic.Modes;
        double kt0 = sorted[0].Temperature.ThermalEnergyInElectronVolts;
        var zeroPoint = modes.Select(m => m.QuantumVarianceInAngstromsSquared * Math.Tanh(0.5 * m.QuantumToThermalRatio)).ToArray();
        var quantumEnergies = modes.Select(m => m.QuantumToThermalRatio * kt0).ToArray();
        double perKelvin = sorted[0].Harmonic.ClassicalMeanSquareDisplacement / t[0];
        var dense = Enumerable.Range(0, 200).Select(i => t[^1] * (i + 1) / 200.0).ToArray();
        AddCurve(plot, dense, dense.Select(x => perKelvin * x / L2).ToArray(), Harmonic, LinePattern.Dashed, "MSD, classical harmonic");
        AddCurve(plot, dense, dense.Select(x =>
        {
            double kt = x * Units.PhysicalConstants.BoltzmannElectronVoltPerKelvin;
            return zeroPoint.Select((z, i) => z / Math.Tanh(0.5 * quantumEnergies[i] / kt)).Sum() / L2;
        }).ToArray(), Quantum, LinePattern.Dotted, "MSD, quantum harmonic");
        AddPoints(plot, sorted.Where(r => r.QuantumExact is not null).Select(r => (r.Temperature.InKelvin, r.QuantumExact!.MeanSquareDisplacementInAngstromsSquared / L2)),
            "MSD, exact quantum (basis)");
        plot.Axes.SetLimitsX(0, 1.05 * t[^1]);
        Title(plot, "Mean-square displacement against temperature", context, sorted.SelectMany(r => r.Warnings).ToList());
        plot.XLabel("temperature (K)");
        plot.YLabel($"mean-square displacement ({unit.LengthName}²)");
        plot.ShowLegend(Alignment.UpperLeft);
        return plot;
    }

    /// <summary>
    /// A pair's quantum and classical distributions together: the classical run (sampled, its exact quadrature and harmonic
    /// Gaussians, as <see cref="PositionDistribution{TPotential}"/> draws them), the exact quantum density (grid) and the
    /// path-integral beads' histogram at P beads with its standard errors.
    /// </summary>
    /// <typeparam name="TPotential">The potential type.</typeparam>
    /// <param name="report">A path-integral report.</param>
    /// <param name="landscape">The landscape it was sampled in.</param>
    /// <param name="context">A line shown under the title, such as the scenario's title; none when null.</param>
    /// <param name="units">The units to draw in; Å when null.</param>
    public static Plot PathIntegralDistribution<TPotential>(PairPathIntegralReport report, PairLandscape<TPotential> landscape, string? context = null,
        FigureUnits? units = null)
        where TPotential : struct, IPairPotential
    {
        ArgumentNullException.ThrowIfNull(report);
        var u = units ?? FigureUnits.Default;
        double L = u.AngstromsPerUnit;
        var plot = PositionDistribution(report.Classical with { QuantumExact = report.Exact, Warnings = report.Warnings }, landscape, context, u);
        Relabel(plot, "sampled (± 1 SE)", "classical, sampled (± 1 SE)");
        Relabel(plot, "exact (quadrature)", "classical, exact (quadrature)");
        var h = report.AtBeads.Histogram;
        var xs = Enumerable.Range(0, h.Density.Length).Select(i => h.BinCentre(i) / L).ToArray();
        var ys = h.Density.Select(d => d * L).ToArray();
        var beads = plot.Add.Scatter(xs, ys, Quantum);
        beads.LineWidth = 0;
        beads.MarkerSize = 6;
        beads.MarkerShape = MarkerShape.FilledSquare;
        beads.LegendText = string.Create(CultureInfo.InvariantCulture, $"path integral, sampled ({report.PathIntegral.Beads} beads, ± 1 SE)");
        var bars = plot.Add.ErrorBar(xs, ys, h.DensityStandardError.Select(d => d * L).ToArray());
        bars.Color = Quantum;
        plot.Axes.AutoScaleY(plot.Axes.Left);
        plot.Axes.SetLimitsY(0, 1.15 * Math.Max(ys.Max(), plot.Axes.Left.Max / 1.15), plot.Axes.Left);
        return plot;
    }

    /// <summary>
    /// A site's quantum marginals along its principal axes (the path-integral beads at P, with the harmonic and quantum
    /// harmonic Gaussians, as <see cref="SiteMarginals"/> draws them) and, as thin lines, the classical run's marginals.
    /// </summary>
    /// <param name="report">A path-integral report of a site.</param>
    /// <param name="context">A line shown under the title; none when null.</param>
    /// <param name="units">The units to draw in; Å when null.</param>
    public static Plot PathIntegralSiteMarginals(SitePathIntegralReport report, string? context = null, FigureUnits? units = null)
    {
        ArgumentNullException.ThrowIfNull(report);
        var unit = units ?? FigureUnits.Default;
        double L = unit.AngstromsPerUnit;
        var plot = SiteMarginals(report.ToVibrationReport(), context, unit);
        for (int axis = 0; axis < 3; axis++)
        {
            Relabel(plot, $"sampled, axis {axis + 1}", $"path integral, axis {axis + 1}", prefix: true);
            var h = report.Classical.Distribution.Marginals[axis];
            var line = plot.Add.Scatter(Enumerable.Range(0, h.Density.Length).Select(i => h.BinCentre(i) / L).ToArray(), h.Density.Select(p => p * L).ToArray(), Axes3[axis]);
            line.MarkerSize = 0;
            line.LineWidth = 1;
            line.LegendText = $"classical, sampled, axis {axis + 1}";
        }
        plot.Axes.AutoScaleY(plot.Axes.Left);
        return plot;
    }

    /// <summary>
    /// A pair's RMS spread against temperature: the classical run and its closed-form curves, the exact quantum (grid)
    /// points and the path-integral values with their standard errors.
    /// </summary>
    /// <param name="reports">Path-integral reports at several temperatures (at least two).</param>
    /// <param name="context">A line shown under the title; none when null.</param>
    /// <param name="units">The units to draw in; Å when null.</param>
    public static Plot PathIntegralSweep(IReadOnlyList<PairPathIntegralReport> reports, string? context = null, FigureUnits? units = null)
    {
        var unit = units ?? FigureUnits.Default;
        double L = unit.AngstromsPerUnit;
        var sorted = SortedByTemperature(reports, r => r.Temperature);
        var plot = TemperatureSweep(sorted.Select(r => r.Classical with { QuantumExact = r.Exact, Warnings = r.Warnings }).ToList(), context, unit);
        Relabel(plot, "RMS spread, sampled", "RMS spread, classical sampled");
        Relabel(plot, "mean shift, sampled", "mean shift, classical sampled");
        AddSeries(plot, sorted.Select(r => r.Temperature.InKelvin).ToArray(), sorted.Select(r => r.Rms.Value / L).ToArray(),
            sorted.Select(r => r.Rms.StandardError / L).ToArray(), Quantum, "RMS spread, path integral");
        plot.Axes.AutoScaleY(plot.Axes.Left);
        return plot;
    }

    /// <summary>
    /// A site's mean-square displacement against temperature: the classical run and the classical and quantum harmonic
    /// curves, the exact quantum (basis) points where the basis reaches, and the path-integral values with their standard errors.
    /// </summary>
    /// <param name="reports">Path-integral reports of a site at several temperatures (at least two).</param>
    /// <param name="context">A line shown under the title; none when null.</param>
    /// <param name="units">The units to draw in; Å when null.</param>
    public static Plot PathIntegralSweep(IReadOnlyList<SitePathIntegralReport> reports, string? context = null, FigureUnits? units = null)
    {
        var unit = units ?? FigureUnits.Default;
        double L2 = unit.AngstromsPerUnit * unit.AngstromsPerUnit;
        var sorted = SortedByTemperature(reports, r => r.Temperature);
        var plot = TemperatureSweep(sorted.Select(r => r.Classical with { QuantumExact = r.Exact, Warnings = r.Warnings }).ToList(), context, unit);
        Relabel(plot, "MSD, sampled", "MSD, classical sampled");
        AddSeries(plot, sorted.Select(r => r.Temperature.InKelvin).ToArray(), sorted.Select(r => r.MeanSquareDisplacement.Value / L2).ToArray(),
            sorted.Select(r => r.MeanSquareDisplacement.StandardError / L2).ToArray(), Quantum, "MSD, path integral");
        plot.Axes.AutoScaleY(plot.Axes.Left);
        return plot;
    }

    /// <summary>
    /// A pair's RMS spread against temperature from reweighting: the reweighted values as a band (± 1 standard error), the
    /// sampled temperatures as points with error bars, and the exact quadrature at the reweighted temperatures as a line.
    /// </summary>
    /// <param name="sampled">The sampled temperatures' reports.</param>
    /// <param name="reweighted">The reweighted estimates (at least two).</param>
    /// <param name="context">A line shown under the title; none when null.</param>
    /// <param name="units">The units to draw in; Å when null.</param>
    public static Plot ReweightedSweep(IReadOnlyList<PairVibrationReport> sampled, IReadOnlyList<ReweightedPairEstimate> reweighted, string? context = null,
        FigureUnits? units = null)
    {
        ArgumentNullException.ThrowIfNull(sampled);
        var unit = units ?? FigureUnits.Default;
        double L = unit.AngstromsPerUnit;
        var sorted = SortedByTemperature(reweighted, r => r.Temperature);
        var plot = new Plot();
        double[] t = sorted.Select(r => r.Temperature.InKelvin).ToArray();
        AddBand(plot, t, [.. sorted.Select(r => r.Rms)], L, "RMS spread, reweighted (± 1 SE)");
        AddCurve(plot, t, sorted.Select(r => r.Exact.RmsInAngstroms / L).ToArray(), Exact, LinePattern.Dashed, "RMS spread, exact (quadrature)");
        var points = sampled.OrderBy(r => r.Temperature.InKelvin).ToList();
        AddSeries(plot, points.Select(r => r.Temperature.InKelvin).ToArray(), points.Select(r => r.Rms.Value / L).ToArray(),
            points.Select(r => r.Rms.StandardError / L).ToArray(), Sampled, "RMS spread, sampled");
        Title(plot, "Thermal spread against temperature, reweighted between the sampled temperatures", context, points.SelectMany(r => r.Warnings).ToList());
        plot.XLabel("temperature (K)");
        plot.YLabel($"RMS spread ({unit.LengthName})");
        plot.ShowLegend(Alignment.UpperLeft);
        return plot;
    }

    /// <summary>A site's mean-square displacement against temperature from reweighting: the reweighted band and the sampled points.</summary>
    /// <param name="sampled">The sampled temperatures' reports.</param>
    /// <param name="reweighted">The reweighted estimates (at least two).</param>
    /// <param name="context">A line shown under the title; none when null.</param>
    /// <param name="units">The units to draw in; Å when null.</param>
    public static Plot ReweightedSweep(IReadOnlyList<SiteVibrationReport> sampled, IReadOnlyList<ReweightedSiteEstimate> reweighted, string? context = null,
        FigureUnits? units = null)
    {
        ArgumentNullException.ThrowIfNull(sampled);
        var unit = units ?? FigureUnits.Default;
        double L2 = unit.AngstromsPerUnit * unit.AngstromsPerUnit;
        var sorted = SortedByTemperature(reweighted, r => r.Temperature);
        var plot = new Plot();
        double[] t = sorted.Select(r => r.Temperature.InKelvin).ToArray();
        AddBand(plot, t, [.. sorted.Select(r => r.MeanSquareDisplacement)], L2, "MSD, reweighted (± 1 SE)");
        var points = sampled.OrderBy(r => r.Temperature.InKelvin).ToList();
        AddSeries(plot, points.Select(r => r.Temperature.InKelvin).ToArray(), points.Select(r => r.MeanSquareDisplacement.Value / L2).ToArray(),
            points.Select(r => r.MeanSquareDisplacement.StandardError / L2).ToArray(), Sampled, "MSD, sampled");
        Title(plot, "Mean-square displacement against temperature, reweighted between the sampled temperatures", context, points.SelectMany(r => r.Warnings).ToList());
        plot.XLabel("temperature (K)");
        plot.YLabel($"mean-square displacement ({unit.LengthName}²)");
        plot.ShowLegend(Alignment.UpperLeft);
        return plot;
    }

    /// <summary>
    /// A site's basin populations against temperature: each basin's sampled share with its standard error, and as a line
    /// its grid-quadrature share (the equilibrium answer on the basin map).
    /// </summary>
    /// <param name="reports">Site reports at several temperatures (at least two).</param>
    /// <param name="context">A line shown under the title; none when null.</param>
    public static Plot BasinPopulations(IReadOnlyList<SiteVibrationReport> reports, string? context = null)
    {
        var sorted = SortedByTemperature(reports, r => r.Temperature);
        var plot = new Plot();
        double[] t = sorted.Select(r => r.Temperature.InKelvin).ToArray();
        int basins = sorted.Max(r => r.BasinPopulations.Length == 0 ? 0 : r.BasinPopulations.Max(p => p.Index) + 1);
        Color[] palette = [Sampled, Harmonic, Exact, FirstOrder, Quantum, Potential, .. Axes3];
        for (int i = 0; i < basins; i++)
        {
            var color = palette[i % palette.Length];
            BasinPopulation? At(SiteVibrationReport r) => r.BasinPopulations.FirstOrDefault(p => p.Index == i);
            string name = i == 0 ? "site basin" : sorted.Any(r => At(r) is { Minimum: null }) ? "to the wall" : $"basin {i}";
            AddSeries(plot, t, sorted.Select(r => At(r)?.SampledShare.Value ?? 0).ToArray(), sorted.Select(r => At(r)?.SampledShare.StandardError ?? 0).ToArray(), color,
                $"{name}, sampled");
            AddCurve(plot, t, sorted.Select(r => At(r)?.QuadratureShare ?? 0).ToArray(), color, LinePattern.Dashed, $"{name}, quadrature");
        }
        Title(plot, "Basin populations against temperature", context, sorted.SelectMany(r => r.Warnings).ToList());
        plot.XLabel("temperature (K)");
        plot.YLabel("share of the draws");
        plot.Axes.SetLimitsY(0, 1.05);
        plot.ShowLegend(Alignment.UpperRight);
        return plot;
    }

    /// <summary>The estimates ± 1 standard error as a shaded band, each divided by <paramref name="unit"/>.</summary>
    private static void AddBand(Plot plot, double[] x, Estimate[] values, double unit, string label)
    {
        var band = plot.Add.FillY(x, [.. values.Select(v => (v.Value - v.StandardError) / unit)], [.. values.Select(v => (v.Value + v.StandardError) / unit)]);
        band.FillStyle.Color = Sampled.WithAlpha(0.3);
        band.LineStyle.Width = 0;
        band.LegendText = label;
    }

    /// <summary>Renames the legend entry <paramref name="from"/> (or every entry starting with it, with <paramref name="prefix"/>).</summary>
    private static void Relabel(Plot plot, string from, string to, bool prefix = false)
    {
        foreach (var scatter in plot.GetPlottables().OfType<ScottPlot.Plottables.Scatter>())
        {
            if (scatter.LegendText == from)
            {
                scatter.LegendText = to;
            }
            else if (prefix && scatter.LegendText.StartsWith(from, StringComparison.Ordinal))
            {
                scatter.LegendText = to + scatter.LegendText[from.Length..];
            }
        }
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

    /// <summary>Where the report carries the exact quantum distribution (classical statistics fail), its density as a solid line; returns its peak (0 without one).</summary>
    private static double AddQuantumExact(Plot plot, PairVibrationReport report, double lengthUnit)
    {
        if (report.QuantumExact is not { } q || q.Grid.Length < 2)
        {
            return 0;
        }
        double spacing = q.Grid[1] - q.Grid[0];
        var density = q.Probabilities.Select(p => p / spacing * lengthUnit).ToArray();
        var line = plot.Add.Scatter(q.Grid.Select(r => r / lengthUnit).ToArray(), density, Quantum);
        line.MarkerSize = 0;
        line.LineWidth = 2;
        line.LegendText = "exact quantum (grid)";
        return density.Max();
    }

    /// <summary>Points (temperature, value) as markers in the quantum colour, where a report carries an exact quantum answer; nothing when none does.</summary>
    private static void AddPoints(Plot plot, IEnumerable<(double Kelvin, double Value)> points, string label)
    {
        var list = points.ToList();
        if (list.Count == 0)
        {
            return;
        }
        var marks = plot.Add.Scatter(list.Select(p => p.Kelvin).ToArray(), list.Select(p => p.Value).ToArray(), Quantum);
        marks.LineWidth = 0;
        marks.MarkerSize = 9;
        marks.MarkerShape = MarkerShape.OpenDiamond;
        marks.LegendText = label;
    }

    private static bool HasQuantumWarning(IEnumerable<Warning> warnings)
        => warnings.Any(w => w.Code is WarningCodes.QuantumEffects or WarningCodes.DeBroglieWavelength);

    /// <summary>
    /// The title, the caller's context line (for example the scenario's title, with "invented" where it is) and, in red
    /// at the foot of the plot, a note naming the cautions that apply to what is drawn.
    /// </summary>
    private static void Title(Plot plot, string title, string? context, IReadOnlyCollection<Warning> warnings)
    {
        plot.Title(context is null ? title : title + "\n" + WrapLines(context, 90));
        var notes = new List<string>();
        if (HasQuantumWarning(warnings))
        {
            // The plotted exact quantum curve is named when there is one (its legend says which); else the harmonic one.
            notes.Add(plot.PlottableList.OfType<ScottPlot.Plottables.Scatter>().Any(p => p.LegendText == "exact quantum (grid)")
                ? "classical statistics unreliable (quantum-effects): see the exact quantum curve"
                : "classical statistics unreliable (quantum-effects): see the quantum harmonic curve");
        }
        if (warnings.Any(w => w.Code == WarningCodes.LeftSite))
        {
            notes.Add("the particle left its site (left-site)");
        }
        if (warnings.Any(w => w.Code is WarningCodes.WallMass or WarningCodes.EscapeRisk))
        {
            notes.Add("walls or confinement hold the particle (wall-mass, escape-risk)");
        }
        if (notes.Count > 0)
        {
            var note = plot.Add.Annotation("caution: " + string.Join("\n         ", notes), Alignment.LowerLeft);
            note.LabelFontColor = Color.FromHex("#b00020");
            note.LabelFontSize = 11;
            note.LabelBackgroundColor = Colors.White.WithAlpha(0.85);
        }
    }

    /// <summary>Breaks <paramref name="text"/> into lines of at most <paramref name="width"/> characters at spaces.</summary>
    private static string WrapLines(string text, int width)
    {
        var lines = new List<string>();
        var line = new System.Text.StringBuilder();
        foreach (string word in text.Split(' ', StringSplitOptions.RemoveEmptyEntries))
        {
            if (line.Length > 0 && line.Length + 1 + word.Length > width)
            {
                lines.Add(line.ToString());
                line.Clear();
            }
            line.Append(line.Length > 0 ? " " : "").Append(word);
        }
        lines.Add(line.ToString());
        return string.Join("\n", lines);
    }

    /// <summary>A unit direction as "(0.71, 0.71, 0)", with no "−0.00" for a component that rounds to zero.</summary>
    internal static string Direction(Vector<double> v)
    {
        string Component(double x)
        {
            string text = x.ToString("F2", CultureInfo.InvariantCulture);
            return text is "-0.00" or "0.00" ? "0" : text;
        }
        return $"({Component(v[0])}, {Component(v[1])}, {Component(v[2])})";
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
