using System;
using System.Diagnostics;
using System.Linq;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Reports;
using ThermalSampling.Sampling;
using ThermalSampling.Units;
using Xunit;
using Xunit.Abstractions;

namespace ThermalSampling.Tests;

/// <summary>Multiple-histogram reweighting across temperatures against exact quadrature and direct runs.</summary>
public class ReweightingTests(ITestOutputHelper output)
{
    /// <summary>An invented Lennard-Jones pair (15 meV at 3.5 Å) on [3.0, 5.0] Å.</summary>
    private static readonly PairLandscape<LennardJones> Line =
        PairLandscape.Line(LennardJones.FromMinimum(Length.FromAngstroms(3.5), Energy.FromElectronVolts(0.015)), Length.FromAngstroms(3.0), Length.FromAngstroms(5.0));

    private static readonly SamplingSettings Settings = new() { Seed = 5, Chains = 8, SamplesPerChain = 100_000, BurnIn = 5_000 };

    /// <summary>
    /// Runs at 10, 20 and 40 K reweighted to six temperatures between them: mean and variance agree with exact quadrature
    /// (this project's, validated against an independent integrator) within 4 jackknife standard errors, and with direct
    /// runs at those temperatures within 4 combined standard errors.
    /// </summary>
    [Fact]
    public void Reweighted_pair_agrees_with_exact_quadrature_and_direct_runs()
    {
        var sampled = new[] { 10.0, 20, 40 }.Select(k => PairSampler.Sample(Line, Temperature.FromKelvin(k), Settings)).ToList();
        var targets = new[] { 12.0, 15, 18, 25, 30, 35 }.Select(Temperature.FromKelvin).ToList();
        var reweighted = Reweighting.Pair(Line, sampled, targets);
        Assert.Equal(6, reweighted.Length);
        foreach (var r in reweighted)
        {
            var direct = PairSampler.Run(Line, Mass.FromAtomicMassUnits(50), r.Temperature, Settings with { Seed = 99 });
            output.WriteLine($"{r.Temperature.InKelvin} K from {r.Source.LowerKelvin}–{r.Source.UpperKelvin} (overlap {r.Source.Overlap:F2}): mean {r.Mean} exact {r.Exact.MeanInAngstroms:G6} direct {direct.Mean}; var {r.Variance} exact {r.Exact.VarianceInAngstromsSquared:G6} direct {direct.Variance}");
            Assert.True(Math.Abs(r.Mean.ZScore(r.Exact.MeanInAngstroms)) < 4, $"mean at {r.Temperature.InKelvin} K");
            Assert.True(Math.Abs(r.Variance.ZScore(r.Exact.VarianceInAngstromsSquared)) < 4, $"variance at {r.Temperature.InKelvin} K");
            double combined = Math.Sqrt(r.Variance.StandardError * r.Variance.StandardError + direct.Variance.StandardError * direct.Variance.StandardError);
            Assert.True(Math.Abs(r.Variance.Value - direct.Variance.Value) < 4 * combined);
            Assert.True(r.Variance.StandardError > 0 && r.Source.Overlap >= Reweighting.MinimumOverlap);
            // ⟨V⟩ against an independent quadrature (MathNet Gauss–Legendre, 64 panels of 32 points over the window), within
            // 4 standard errors and half a fine energy bin (the estimate takes each draw's energy at its bin's centre; the
            // bins are at most kT/32 wide).
            double kt = r.Temperature.ThermalEnergyInElectronVolts, vRef = sampled[0].Chains[0].EnergyReferenceInElectronVolts;
            double lo = Line.WindowLowerInAngstroms, h = Line.WindowWidthInAngstroms / 64, z = 0, zv = 0;
            for (int panel = 0; panel < 64; panel++)
            {
                double a = lo + panel * h;
                z += MathNet.Numerics.Integration.GaussLegendreRule.Integrate(x => Math.Exp(-(Line.Potential.Energy(x) - vRef) / kt), a, a + h, 32);
                zv += MathNet.Numerics.Integration.GaussLegendreRule.Integrate(x => (Line.Potential.Energy(x) - vRef) * Math.Exp(-(Line.Potential.Energy(x) - vRef) / kt), a, a + h, 32);
            }
            double exactEnergy = zv / z;
            output.WriteLine($"  ⟨V⟩ − V_ref {r.PotentialEnergy.Value:G6} ± {r.PotentialEnergy.StandardError:G3} eV, quadrature {exactEnergy:G6} eV");
            Assert.True(Math.Abs(r.PotentialEnergy.Value - exactEnergy) < 4 * r.PotentialEnergy.StandardError + kt / 64, $"⟨V⟩ at {r.Temperature.InKelvin} K");
        }
    }

    /// <summary>Targets outside the sampled range, or between runs too far apart to overlap, are refused naming them and the overlap found.</summary>
    [Fact]
    public void Targets_without_overlap_are_refused_by_name()
    {
        var settings = Settings with { Chains = 2, SamplesPerChain = 20_000 };
        var far = new[] { 2.0, 60 }.Select(k => PairSampler.Sample(Line, Temperature.FromKelvin(k), settings)).ToList();
        var ex = Assert.Throws<ArgumentException>(() => Reweighting.Pair(Line, far, [Temperature.FromKelvin(10), Temperature.FromKelvin(80)]));
        output.WriteLine(ex.Message);
        Assert.Contains("10 K (between 2 K and 60 K, whose common energy bins of", ex.Message);
        Assert.Contains("80 K (outside the sampled 2–60 K)", ex.Message);
        Assert.Equal("targets", ex.ParamName);
    }

    /// <summary>
    /// The overlap measure Σ_b min(p_i, p_j) on hand-made records: identical histograms overlap by 1, disjoint ones by 0,
    /// and half-shared ones by one half; a hotter run's wider bins are coarsened onto (nesting exactly).
    /// </summary>
    [Fact]
    public void Overlap_is_the_shared_probability_of_two_energy_histograms()
    {
        var layout = new RecordLayout(1, 1000, 64, 0, [3.5], 0, 3.0, 5.0, 10, [], null);
        ChainRecord Make(double width, params (int Slot, long Count)[] counts)
        {
            var r = new ChainRecord(layout, 0, width);
            foreach (var (slot, count) in counts)
            {
                r.Reweighting.Counts[slot] = count;
            }
            return r;
        }
        double w = 1.0 / 1024; // the coarse width; fine bins are half of it
        Assert.Equal(1.0, HistogramReweighting.Overlap([Make(w, (1, 10), (2, 30))], [Make(w, (1, 10), (2, 30))]), 12);
        Assert.Equal(0.0, HistogramReweighting.Overlap([Make(w, (1, 10))], [Make(w, (5, 10))]), 12);
        Assert.Equal(0.5, HistogramReweighting.Overlap([Make(w, (1, 10), (3, 10))], [Make(w, (1, 10), (7, 10))]), 12);
        // Twice the width: fine slots 1 and 2 of the colder run form coarse bin 1 of the hotter one.
        Assert.Equal(1.0, HistogramReweighting.Overlap([Make(w, (1, 5), (2, 5))], [Make(2 * w, (1, 10))]), 12);
    }

    /// <summary>
    /// A site (the invented 12-neighbour Lennard-Jones cage) sampled at 20 and 40 K and reweighted to 25, 30 and 35 K: the
    /// mean-square displacement agrees with direct runs at those temperatures within 4 combined standard errors, and the
    /// covariance stays isotropic (the cage's Oh symmetry).
    /// </summary>
    [Fact]
    public void Reweighted_site_agrees_with_direct_runs()
    {
        var settings = new SamplingSettings { Seed = 8, Chains = 8, SamplesPerChain = 40_000, BurnIn = 4_000 };
        var sampled = new[] { 20.0, 40 }.Select(k => SiteSampler.Sample(InventedLandscapes.Cage, Temperature.FromKelvin(k), settings)).ToList();
        var reweighted = Reweighting.Site(InventedLandscapes.Cage, sampled, [.. new[] { 25.0, 30, 35 }.Select(Temperature.FromKelvin)]);
        foreach (var r in reweighted)
        {
            var direct = SiteSampler.Run(InventedLandscapes.Cage, Mass.FromAtomicMassUnits(40), r.Temperature, settings with { Seed = 77 });
            output.WriteLine($"{r.Temperature.InKelvin} K: MSD {r.MeanSquareDisplacement} direct {direct.MeanSquareDisplacement}; covariance {r.Covariance}");
            double combined = Math.Sqrt(Math.Pow(r.MeanSquareDisplacement.StandardError, 2) + Math.Pow(direct.MeanSquareDisplacement.StandardError, 2));
            Assert.True(Math.Abs(r.MeanSquareDisplacement.Value - direct.MeanSquareDisplacement.Value) < 4 * combined);
            Assert.InRange(r.Covariance.XX / r.Covariance.ZZ, 0.9, 1.1);
            Assert.Equal(8 * Math.PI * Math.PI / 3 * r.MeanSquareDisplacement.Value, r.DebyeWallerB.Value, 1e-12);
        }
    }

    /// <summary>Reweighting 10 runs onto 200 temperatures (the speed target is 1 s; BenchmarkDotNet measures it, this only checks it completes and is sane).</summary>
    [Fact]
    public void Many_targets_from_many_runs()
    {
        var settings = new SamplingSettings { Seed = 2, Chains = 4, SamplesPerChain = 10_000, BurnIn = 1_000 };
        var runs = Enumerable.Range(0, 10).Select(i => PairSampler.Sample(Line, Temperature.FromKelvin(10 + 3 * i), settings)).ToList();
        var targets = Enumerable.Range(0, 200).Select(i => Temperature.FromKelvin(10 + 27.0 * i / 199)).ToList();
        var all = Reweighting.Pair(Line, runs, targets);
        Assert.Equal(200, all.Length);
        Assert.True(all.Zip(all.Skip(1)).All(p => p.Second.Variance.Value > p.First.Variance.Value - 5 * p.First.Variance.StandardError));
    }

    /// <summary>The reweighted sweep figure draws the band, the exact curve and the sampled points (their legends).</summary>
    [Fact]
    public void Reweighted_sweep_figure_renders()
    {
        var settings = new SamplingSettings { Seed = 2, Chains = 2, SamplesPerChain = 8_000, BurnIn = 1_000 };
        var records = new[] { 10.0, 20 }.Select(k => PairSampler.Sample(Line, Temperature.FromKelvin(k), settings)).ToList();
        var reports = records.Select(r => PairSampler.Summarise(Line, Mass.FromAtomicMassUnits(50), r)).ToList();
        var reweighted = Reweighting.Pair(Line, records, [.. Enumerable.Range(0, 11).Select(i => Temperature.FromKelvin(10 + i))]);
        string svg = Plotting.VibrationFigures.ReweightedSweep(reports, reweighted).GetSvgXml(800, 500);
        Assert.Contains("RMS spread, reweighted (± 1 SE)", svg);
        Assert.Contains("RMS spread, exact (quadrature)", svg);
        Assert.Contains("RMS spread, sampled", svg);
    }
}
