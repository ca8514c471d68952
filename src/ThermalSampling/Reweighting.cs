using System;
using System.Collections.Generic;
using System.Collections.Immutable;
using System.Globalization;
using System.Linq;
using ThermalSampling.Analysis;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Reports;
using ThermalSampling.Sampling;
using ThermalSampling.Statistics;
using ThermalSampling.Units;

namespace ThermalSampling;

/// <summary>
/// Observables on a fine temperature grid from runs at a few temperatures: multiple-histogram reweighting (Ferrenberg &amp;
/// Swendsen 1989) of the two sampled temperatures that bracket each target, on the records' fine energy bins, with
/// standard errors from the jackknife over groups of consecutive draws (eight per chain; group g of chain c left out of
/// both runs in turn). A target outside the sampled range, between two runs whose energy histograms overlap by less than
/// <see cref="MinimumOverlap"/>, or whose common energy bins are wider than <see cref="MaximumBinWidthInThermalEnergies"/>·kT, is refused.
/// docs/reweighting.md gives the method and its checks.
/// </summary>
public static class Reweighting
{
    /// <summary>
    /// The least overlap Σ_b min(p_i, p_j) of two neighbouring runs' normalised energy histograms (on their common bins)
    /// for a target between them. Our threshold; no source.
    /// </summary>
    public const double MinimumOverlap = 0.05;

    /// <summary>
    /// The widest common energy bin, in units of kT at the target, over which a draw's Boltzmann factor is taken as
    /// constant (its bin's centre): 1/8, so that e^(−βE) varies by at most 13 % across a bin. The hotter bracketing run sets
    /// the bin (2^⌊log₂(kT/16)⌋), so it may be at most two to four times the target's temperature.
    /// </summary>
    public const double MaximumBinWidthInThermalEnergies = 0.125;

    /// <summary>Reweights a pair's records (complete, one per sampled temperature, same landscape and settings) to <paramref name="targets"/>.</summary>
    /// <typeparam name="TPotential">The potential type.</typeparam>
    /// <param name="landscape">The landscape the records were sampled in.</param>
    /// <param name="records">Complete records of at least one temperature (from <see cref="PairSampler.Sample{TPotential}"/>).</param>
    /// <param name="targets">The target temperatures, within the sampled range.</param>
    /// <exception cref="ArgumentException">Naming the targets outside the sampled range or between runs that overlap too little, and the overlaps found.</exception>
    public static ImmutableArray<ReweightedPairEstimate> Pair<TPotential>(PairLandscape<TPotential> landscape, IReadOnlyList<TemperatureRecord> records,
        IEnumerable<Temperature> targets)
        where TPotential : struct, IPairPotential
    {
        Internal.Preconditions.CheckNotNull(landscape, nameof(landscape));
        var runs = Check(records, "pair", PairChains.Fingerprint(landscape));
        double reference = runs[0].Chains[0].Layout.References[0];
        var well = PairSummary.Analyse(landscape, RunArguments.NominalMass, runs[0].Temperature).Well; // mass-free: the minimum
        var solved = new Dictionary<(int, int), (List<HistogramReweighting.Pair>, double)>();
        return [.. Plan(runs, targets).Select(p =>
        {
            var (values, energy, source) = Evaluate(runs, p, solved);
            double Mean(double[] v) => reference + v[0];
            double Variance(double[] v) => v[1] - v[0] * v[0];
            var mean = Jack(values, Mean);
            var variance = Jack(values, Variance);
            double rms = Math.Sqrt(Math.Max(variance.Value, 0));
            return new ReweightedPairEstimate
            {
                Temperature = p.At,
                Mean = mean,
                MeanShift = well is null ? null : new Estimate(mean.Value - well.EquilibriumDistanceInAngstroms, mean.StandardError),
                Variance = variance,
                Rms = new Estimate(rms, rms > 0 ? variance.StandardError / (2 * rms) : 0),
                PotentialEnergy = JackScalar(energy),
                Exact = ExactPairDistribution.Compute(landscape, p.At),
                Source = source,
            };
        })];
    }

    /// <summary>Reweights a site's records to <paramref name="targets"/>.</summary>
    /// <typeparam name="TPotential">The potential type.</typeparam>
    /// <param name="landscape">The landscape the records were sampled in.</param>
    /// <param name="records">Complete records of at least one temperature (from <see cref="SiteSampler.Sample{TPotential}"/>).</param>
    /// <param name="targets">The target temperatures, within the sampled range.</param>
    /// <exception cref="ArgumentException">Naming the targets outside the sampled range or between runs that overlap too little.</exception>
    public static ImmutableArray<ReweightedSiteEstimate> Site<TPotential>(SiteLandscape<TPotential> landscape, IReadOnlyList<TemperatureRecord> records,
        IEnumerable<Temperature> targets)
        where TPotential : struct, IPairPotential
    {
        Internal.Preconditions.CheckNotNull(landscape, nameof(landscape));
        var runs = Check(records, "sites", SiteChains.Fingerprint(landscape));
        var refs = runs[0].Chains[0].Layout.References;
        double bFactor = 8 * Math.PI * Math.PI / 3;
        var solved = new Dictionary<(int, int), (List<HistogramReweighting.Pair>, double)>();
        return [.. Plan(runs, targets).Select(p =>
        {
            var (values, energy, source) = Evaluate(runs, p, solved);
            double Msd(double[] v) => v[3] + v[4] + v[5] - v[0] * v[0] - v[1] * v[1] - v[2] * v[2];
            var msd = Jack(values, Msd);
            var full = values[0];
            return new ReweightedSiteEstimate
            {
                Temperature = p.At,
                Mean = new Position(refs[0] + full[0], refs[1] + full[1], refs[2] + full[2]),
                MeanStandardError = new Position(Jack(values, v => v[0]).StandardError, Jack(values, v => v[1]).StandardError, Jack(values, v => v[2]).StandardError),
                Covariance = new SymmetricTensor(full[3] - full[0] * full[0], full[4] - full[1] * full[1], full[5] - full[2] * full[2],
                    full[6] - full[0] * full[1], full[7] - full[0] * full[2], full[8] - full[1] * full[2]),
                MeanSquareDisplacement = msd,
                DebyeWallerB = new Estimate(bFactor * msd.Value, bFactor * msd.StandardError),
                PotentialEnergy = JackScalar(energy),
                Source = source,
            };
        })];
    }

    /// <summary>A target and the indices of the runs that bracket it (equal when it was sampled).</summary>
    private readonly record struct Target(Temperature At, int Lower, int Upper, double Overlap);

    private static List<TemperatureRecord> Check(IReadOnlyList<TemperatureRecord> records, string kind, string fingerprint)
    {
        Internal.Preconditions.CheckNotNull(records, nameof(records));
        if (records.Count == 0)
        {
            throw new ArgumentException("records is empty; reweighting needs at least one sampled temperature.", nameof(records));
        }
        foreach (var r in records)
        {
            r.CheckSummarisable(kind, fingerprint, nameof(records));
        }
        var sorted = records.OrderBy(r => r.Temperature.InKelvin).ToList();
        for (int i = 1; i < sorted.Count; i++)
        {
            if (sorted[i].Temperature.InKelvin == sorted[i - 1].Temperature.InKelvin)
            {
                throw new ArgumentException(string.Create(CultureInfo.InvariantCulture, $"records holds {sorted[i].Temperature.InKelvin:R} K twice; give each temperature once."), nameof(records));
            }
        }
        return sorted;
    }

    private static List<Target> Plan(List<TemperatureRecord> runs, IEnumerable<Temperature> targets)
    {
        Internal.Preconditions.CheckNotNull(targets, nameof(targets));
        var list = new List<Target>();
        var refused = new List<string>();
        var overlaps = new Dictionary<int, double>();
        double lo = runs[0].Temperature.InKelvin, hi = runs[^1].Temperature.InKelvin;
        var c = CultureInfo.InvariantCulture;
        foreach (var t in targets)
        {
            double k = Internal.Preconditions.CheckPositive(t.InKelvin, nameof(targets));
            int exact = runs.FindIndex(r => r.Temperature.InKelvin == k);
            if (exact >= 0)
            {
                list.Add(new Target(t, exact, exact, 1));
                continue;
            }
            if (k < lo || k > hi)
            {
                refused.Add(string.Format(c, "{0:G6} K (outside the sampled {1:G6}–{2:G6} K)", k, lo, hi));
                continue;
            }
            int upper = runs.FindIndex(r => r.Temperature.InKelvin > k);
            if (!overlaps.TryGetValue(upper, out double overlap))
            {
                overlap = overlaps[upper] = HistogramReweighting.Overlap(runs[upper - 1].Chains, runs[upper].Chains);
            }
            double width = Math.Max(runs[upper - 1].Chains[0].Reweighting.Width, runs[upper].Chains[0].Reweighting.Width);
            if (width > t.ThermalEnergyInElectronVolts * MaximumBinWidthInThermalEnergies)
            {
                refused.Add(string.Format(c, "{0:G6} K (between {1:G6} K and {2:G6} K, whose common energy bins of {3:G3} meV are wider than kT/8 = {4:G3} meV there: the hotter run is too hot for this target)", k,
                    runs[upper - 1].Temperature.InKelvin, runs[upper].Temperature.InKelvin, width * 1e3, t.ThermalEnergyInElectronVolts / 8 * 1e3));
                continue;
            }
            if (overlap < MinimumOverlap)
            {
                refused.Add(string.Format(c, "{0:G6} K (between {1:G6} K and {2:G6} K, whose energy histograms overlap by {3:G3}, below {4})", k,
                    runs[upper - 1].Temperature.InKelvin, runs[upper].Temperature.InKelvin, overlap, MinimumOverlap));
                continue;
            }
            list.Add(new Target(t, upper - 1, upper, overlap));
        }
        if (refused.Count > 0)
        {
            throw new ArgumentException("targets cannot be reweighted: " + string.Join("; ", refused)
                + ". Sample more temperatures between them (the overlap is Σ_b min(p_i, p_j) of the two runs' normalised energy histograms).", nameof(targets));
        }
        return list;
    }

    /// <summary>The averages at the target from every group (index 0) and with each group left out (1 …), the energy likewise, and the source; the bracketing runs' solutions are cached in <paramref name="solved"/>.</summary>
    private static (List<double[]> Values, List<double> Energy, ReweightingSource Source) Evaluate(List<TemperatureRecord> runs, Target p,
        Dictionary<(int, int), (List<HistogramReweighting.Pair> Solutions, double Overlap)> solved)
    {
        var a = runs[p.Lower];
        var b = runs[p.Upper];
        if (!solved.TryGetValue((p.Lower, p.Upper), out var entry))
        {
            double betaA = 1 / a.Temperature.ThermalEnergyInElectronVolts, betaB = 1 / b.Temperature.ThermalEnergyInElectronVolts;
            // Jackknife units: each chain's groups of consecutive draws (the same chain index in both runs shares a unit).
            int units = (Math.Max(a.Chains.Max(c => c.Chain), b.Chains.Max(c => c.Chain)) + 1) * EnergyBinSums.Groups;
            var solutions = new HistogramReweighting.Pair[units + 1];
            System.Threading.Tasks.Parallel.For(-1, units, skip => solutions[skip + 1] = HistogramReweighting.Solve(a.Chains, betaA, b.Chains, betaB, skip));
            entry = ([.. solutions], p.Overlap); // measured once, when the target was planned
            solved[(p.Lower, p.Upper)] = entry;
        }
        double beta = 1 / p.At.ThermalEnergyInElectronVolts;
        var values = new List<double[]>();
        var energy = new List<double>();
        foreach (var solution in entry.Solutions)
        {
            var (v, e) = HistogramReweighting.Average(solution, beta);
            values.Add(v);
            energy.Add(e);
        }
        return (values, energy, new ReweightingSource(a.Temperature.InKelvin, b.Temperature.InKelvin, entry.Overlap, entry.Solutions[0].LeftOut));
    }

    /// <summary>The estimate f(all chains) with the jackknife standard error over the leave-one-chain-out values.</summary>
    private static Estimate Jack(List<double[]> values, Func<double[], double> f)
    {
        double full = f(values[0]);
        int g = values.Count - 1;
        if (g < 2)
        {
            return new Estimate(full, double.NaN);
        }
        var reps = values.Skip(1).Select(f).ToArray();
        double mean = reps.Average();
        double variance = (g - 1.0) / g * reps.Sum(r => (r - mean) * (r - mean));
        return new Estimate(full, Math.Sqrt(variance));
    }

    private static Estimate JackScalar(List<double> values) => Jack(values.Select(v => new[] { v }).ToList(), v => v[0]);
}
