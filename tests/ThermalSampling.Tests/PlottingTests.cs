using System;
using System.IO;
using System.Linq;
using ThermalSampling.Landscapes;
using ThermalSampling.Plotting;
using ThermalSampling.Potentials;
using ThermalSampling.Reports;
using ThermalSampling.Sampling;
using ThermalSampling.Units;
using Xunit;

namespace ThermalSampling.Tests;

public class PlottingTests
{
    private static readonly Morse Iron = new(Energy.FromElectronVolts(0.4174), 1.3885, Length.FromAngstroms(2.845)); // Sources.GirifalcoWeizer
    private static readonly PairLandscape<Morse> Line = PairLandscape.Line(Iron, Length.FromAngstroms(2.2), Length.FromAngstroms(4.0));
    private static readonly SamplingSettings Settings = new() { Seed = 3, Chains = 2, SamplesPerChain = 5000, BurnIn = 500, RetainedDrawsPerChain = 5000 };

    private static string Temp(string extension) => Path.Combine(Path.GetTempPath(), $"ts-fig-{Guid.NewGuid():N}{extension}");

    /// <summary>All text drawn in an SVG document (parsed, so entities are decoded).</summary>
    private static string SvgText(string xml)
    {
        var doc = System.Xml.Linq.XDocument.Parse(xml);
        Assert.Equal("svg", doc.Root!.Name.LocalName);
        return string.Join("\n", doc.Descendants().Where(e => e.Name.LocalName == "text").Select(e => e.Value));
    }

    private static (int Width, int Height) PngSize(string path)
    {
        var bytes = File.ReadAllBytes(path);
        Assert.Equal(new byte[] { 0x89, 0x50, 0x4E, 0x47 }, bytes[..4]);
        int w = (bytes[16] << 24) | (bytes[17] << 16) | (bytes[18] << 8) | bytes[19];
        int h = (bytes[20] << 24) | (bytes[21] << 16) | (bytes[22] << 8) | bytes[23];
        return (w, h);
    }

    [Fact]
    public void Position_distribution_is_written_as_png_of_the_requested_size_and_as_svg_with_axis_labels()
    {
        var report = PairSampler.Run(Line, Mass.FromAtomicMassUnits(55.845), Temperature.FromKelvin(300), Settings);
        var plot = VibrationFigures.PositionDistribution(report, Line);
        string png = Temp(".png"), svg = Temp(".svg");
        try
        {
            VibrationFigures.Save(plot, png, 800, 500);
            Assert.Equal((800, 500), PngSize(png));
            Assert.True(new FileInfo(png).Length > 10_000);
            VibrationFigures.Save(plot, svg);
            string text = SvgText(File.ReadAllText(svg));
            Assert.Contains("separation r (Å)", text);
            Assert.Contains("probability density (1/Å)", text);
            Assert.Contains("V(r) − V_min (meV)", text);
        }
        finally
        {
            File.Delete(png);
            File.Delete(svg);
        }
    }

    [Fact]
    public void Site_and_sweep_figures_render()
    {
        var cage = SiteLandscape.Create(LennardJones.FromMinimum(Length.FromAngstroms(3.8), Energy.FromKelvin(119.8)),
            LatticeSites.NeighbourCage(LatticeKind.FaceCentredCubic, Length.FromAngstroms(3.8)), Position.Origin, Confinement.Sphere(Length.FromAngstroms(1.2)));
        var sites = SiteSampler.Sweep(cage, Mass.FromAtomicMassUnits(39.948), new[] { 10.0, 30 }.Select(Temperature.FromKelvin), Settings);
        var pairs = PairSampler.Sweep(Line, Mass.FromAtomicMassUnits(55.845), new[] { 100.0, 300, 600 }.Select(Temperature.FromKelvin), Settings);
        foreach (var plot in new[] { VibrationFigures.SiteMarginals(sites[0]), VibrationFigures.SiteProjection(sites[1]), VibrationFigures.TemperatureSweep(sites), VibrationFigures.TemperatureSweep(pairs) })
        {
            Assert.Contains("Å", SvgText(plot.GetSvgXml(600, 400))); // every figure labels a length axis with its unit
        }
        Assert.Contains("temperature (K)", SvgText(VibrationFigures.TemperatureSweep(pairs).GetSvgXml(600, 400)));
    }

    /// <summary>
    /// Quantum figures draw classical and path-integral results together: the pair distribution with both sampled
    /// histograms, the classical quadrature and the exact quantum density; the site marginals of both; the sweeps with
    /// path-integral points (an invented Morse pair of 2 u, 30 and 60 K; the invented cage with 20 u at 5 and 10 K).
    /// </summary>
    [Fact]
    public void Path_integral_figures_show_classical_and_quantum_together()
    {
        var morse = new Morse(Energy.FromElectronVolts(0.3), 1.8, Length.FromAngstroms(2.0));
        var line = PairLandscape.Line(morse, Length.FromAngstroms(1.2), Length.FromAngstroms(4.5));
        var settings = new SamplingSettings { Seed = 3, Chains = 2, SamplesPerChain = 4000, BurnIn = 500 };
        var pairs = new[] { 30.0, 60 }.Select(k => PathIntegralSampler.RunPair(line, Mass.FromAtomicMassUnits(2), Temperature.FromKelvin(k), settings, beads: 16)).ToList();
        string pairText = SvgText(VibrationFigures.PathIntegralDistribution(pairs[0], line).GetSvgXml(900, 550));
        Assert.Contains("path integral, sampled (16 beads, ± 1 SE)", pairText);
        Assert.Contains("classical, sampled (± 1 SE)", pairText);
        Assert.Contains("exact quantum (grid)", pairText);
        Assert.Contains("classical, exact (quadrature)", pairText);
        string sweepText = SvgText(VibrationFigures.PathIntegralSweep(pairs).GetSvgXml(900, 550));
        Assert.Contains("RMS spread, path integral", sweepText);
        Assert.Contains("RMS spread, classical sampled", sweepText);
        var sites = new[] { 5.0, 10 }.Select(k => PathIntegralSampler.RunSite(InventedLandscapes.Cage, Mass.FromAtomicMassUnits(20), Temperature.FromKelvin(k), settings, beads: 8)).ToList();
        string marginals = SvgText(VibrationFigures.PathIntegralSiteMarginals(sites[0]).GetSvgXml(900, 550));
        Assert.Contains("path integral, axis 1", marginals);
        Assert.Contains("classical, sampled, axis 3", marginals);
        Assert.Contains("MSD, path integral", SvgText(VibrationFigures.PathIntegralSweep(sites).GetSvgXml(900, 550)));
    }

    /// <summary>Site figures are drawn from the report's own distribution (no retained draws needed); bad file types are refused.</summary>
    [Fact]
    public void Site_figures_need_no_retained_draws_and_bad_file_types_are_refused()
    {
        var cage = SiteLandscape.Create(LennardJones.FromMinimum(Length.FromAngstroms(3.8), Energy.FromKelvin(119.8)),
            LatticeSites.NeighbourCage(LatticeKind.FaceCentredCubic, Length.FromAngstroms(3.8)), Position.Origin, Confinement.Sphere(Length.FromAngstroms(1.2)));
        var report = SiteSampler.Run(cage, Mass.FromAtomicMassUnits(39.948), Temperature.FromKelvin(10), Settings with { RetainedDrawsPerChain = 0 });
        Assert.Contains("principal axes", SvgText(VibrationFigures.SiteMarginals(report).GetSvgXml(600, 400)));
        Assert.Contains("Projected density", SvgText(VibrationFigures.SiteProjection(report).GetSvgXml(600, 400)));
        var plot = VibrationFigures.TemperatureSweep(PairSampler.Sweep(Line, Mass.FromAtomicMassUnits(55.845), new[] { 100.0, 300 }.Select(Temperature.FromKelvin), Settings));
        Assert.Equal("path", Assert.Throws<ArgumentException>(() => VibrationFigures.Save(plot, "figure.gif")).ParamName);
        Assert.Throws<ArgumentException>(() => VibrationFigures.TemperatureSweep(Array.Empty<PairVibrationReport>()));
    }

    [Fact]
    public void Cli_plot_option_writes_the_file_asked_for_and_one_figure_per_temperature_beside_it()
    {
        string scenario = Temp(".json");
        File.WriteAllText(scenario, """
            { "mass": 55.8, "potential": { "form": "morse", "wellDepth": 0.4174, "width": 1.3885, "equilibriumDistance": 2.845 },
              "landscape": { "kind": "radial", "window": [2.2, 4.0] }, "temperatures": [100, 300],
              "sampling": { "chains": 2, "samplesPerChain": 3000, "burnIn": 500, "seed": 5 } }
            """);
        string basePath = Temp(".png");
        using var stdout = new MemoryStream();
        using var stderr = new StringWriter();
        int code = ThermalSampling.Cli.Program.Run(new[] { "run", scenario, "--plot", basePath, "--quiet" }, stdout, stderr);
        Assert.True(code == 0, stderr.ToString());
        string dir = Path.GetDirectoryName(basePath)!, stem = Path.GetFileNameWithoutExtension(basePath);
        // FILE itself is the figure against temperature; each temperature's figure goes beside it.
        foreach (string suffix in new[] { "-T100K", "-T300K", "" })
        {
            string f = Path.Combine(dir, stem + suffix + ".png");
            Assert.True(File.Exists(f), f);
            Assert.Equal((ScottPlotSize.Width, ScottPlotSize.Height), PngSize(f));
            File.Delete(f);
        }
        Assert.Contains("figure: ", stderr.ToString());
    }

    [Fact]
    public void A_sweep_of_four_or_more_temperatures_draws_its_distributions_as_panels_of_one_figure()
    {
        string scenario = Temp(".json");
        File.WriteAllText(scenario, """
            { "title": "Invented test pair", "mass": 50, "potential": { "form": "morse", "wellDepth": 0.4, "width": 1.5, "equilibriumDistance": 2.8 },
              "landscape": { "kind": "radial", "window": [2.2, 4.0] }, "temperatures": [100, 200, 300, 400],
              "sampling": { "chains": 2, "samplesPerChain": 2000, "burnIn": 500, "seed": 5 } }
            """);
        string basePath = Temp(".png");
        using var stdout = new MemoryStream();
        using var stderr = new StringWriter();
        Assert.Equal(0, ThermalSampling.Cli.Program.Run(["run", scenario, "--plot", basePath, "--quiet"], stdout, stderr));
        string dir = Path.GetDirectoryName(basePath)!, stem = Path.GetFileNameWithoutExtension(basePath);
        Assert.True(File.Exists(basePath));
        string panels = Path.Combine(dir, stem + "-distributions.png");
        Assert.Equal((3 * VibrationFigures.DefaultWidth, 2 * VibrationFigures.DefaultHeight), PngSize(panels));
        Assert.False(File.Exists(Path.Combine(dir, stem + "-T100K.png")));
        File.Delete(basePath);
        File.Delete(panels);
    }

    [Fact]
    public void Temperatures_in_figure_names_are_rounded_to_what_tells_them_apart()
    {
        var names = ThermalSampling.Cli.FigureWriter.TemperatureNames([10, 37.77777777, 65.5555555, 100]);
        Assert.Equal(["-T10K", "-T38K", "-T66K", "-T100K"], names);
        Assert.Equal(["-T37.7K", "-T37.8K"], ThermalSampling.Cli.FigureWriter.TemperatureNames([37.71, 37.78]));
    }

    [Fact]
    public void Figures_carry_their_context_and_cautions_and_print_directions_without_minus_zero()
    {
        // Invented pair at a temperature where the quantum warning fires: the title line, the caution and the quantum curve.
        var report = PairSampler.Run(Line, Mass.FromAtomicMassUnits(2), Temperature.FromKelvin(20), Settings);
        Assert.Contains(report.Warnings, w => w.Code == ThermalSampling.Analysis.WarningCodes.QuantumEffects);
        string svg = SvgText(VibrationFigures.PositionDistribution(report, Line, "Invented example: a light atom").GetSvgXml(900, 560));
        Assert.Contains("Invented example: a light atom", svg);
        Assert.Contains("caution:", svg);
        Assert.Contains("quantum harmonic Gaussian", svg);
        Assert.NotNull(report.QuantumExact);
        Assert.Contains("exact quantum (grid)", svg); // the right number, drawn: the exact quantum density beside the classical ones
        Assert.Contains("exact quantum (grid)", SvgText(VibrationFigures.SampledDistribution(report).GetSvgXml(900, 560)));
        // The sweep figure marks the exact quantum spread at the temperatures where it was computed.
        var sweep = PairSampler.Sweep(Line, Mass.FromAtomicMassUnits(2), new[] { 20.0, 400 }.Select(Temperature.FromKelvin), Settings);
        Assert.Contains("RMS, exact quantum (grid)", SvgText(VibrationFigures.TemperatureSweep(sweep).GetSvgXml(900, 560)));
        string nm = SvgText(VibrationFigures.PositionDistribution(report, Line, null, new FigureUnits("nm", 10, "meV", 1e-3)).GetSvgXml(900, 560));
        Assert.Contains("separation r (nm)", nm);
        Assert.Contains("probability density (1/nm)", nm);
        Assert.Equal("(0.71, 0, -0.71)", VibrationFigures.Direction(MathNet.Numerics.LinearAlgebra.Vector<double>.Build.Dense([Math.Sqrt(0.5), -1e-9, -Math.Sqrt(0.5)])));
    }

    private static class ScottPlotSize
    {
        public const int Width = VibrationFigures.DefaultWidth;
        public const int Height = VibrationFigures.DefaultHeight;
    }
}

public class FormattingTests
{
    [Theory]
    [InlineData(3.54379, 0.00068, "3.54379 ± 0.00068")]
    [InlineData(0.1025, 0.0014, "0.1025 ± 0.0014")]
    [InlineData(123.456, 12.3, "123 ± 12")]
    [InlineData(2.5, 0.0, "2.5")]
    [InlineData(double.NaN, 0.1, "–")]
    public void Estimates_round_to_two_significant_digits_of_their_error(double value, double error, string expected)
        => Assert.Equal(expected, new Estimate(value, error).ToRoundedString());

    [Fact]
    public void Html_tables_encode_text_and_list_warnings()
    {
        var landscape = PairLandscape.Line(LennardJones.FromMinimum(Length.FromAngstroms(3.5), Energy.FromKelvin(10)), Length.FromAngstroms(3.0), Length.FromAngstroms(8.0));
        var report = PairSampler.Run(landscape, Mass.FromAtomicMassUnits(40), Temperature.FromKelvin(30), new SamplingSettings { Seed = 1, Chains = 2, SamplesPerChain = 2000, BurnIn = 200 });
        string html = report.ToHtml();
        Assert.StartsWith("<table>", html);
        Assert.Contains("<th>RMS (Å)</th>", System.Net.WebUtility.HtmlDecode(html));
        Assert.Contains("wall-mass", html);
        Assert.Contains(" ± ", System.Net.WebUtility.HtmlDecode(html));
    }
}
