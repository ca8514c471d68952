using System;
using System.Collections.Generic;
using System.Collections.Immutable;
using System.Globalization;
using System.Linq;
using ThermalSampling.Landscapes;
using ThermalSampling.Potentials;
using ThermalSampling.Units;

namespace ThermalSampling.Analysis;

/// <summary>
/// A replica-exchange ladder chosen from a target swap acceptance: the given temperatures, with rungs added between
/// neighbours where the predicted acceptance of a swap would fall below the target.
/// </summary>
/// <param name="Temperatures">Every rung, coldest first: the given temperatures and the added ones.</param>
/// <param name="Added">Whether each rung was added (false for a given temperature).</param>
/// <param name="PredictedSwapAcceptance">The predicted acceptance of a swap between rung k and k + 1 (one entry per neighbouring pair).</param>
/// <param name="TargetSwapAcceptance">The least predicted acceptance asked for.</param>
/// <param name="Basis">"exact" (the energy distribution by quadrature of the landscape) or "harmonic" (a three-dimensional harmonic well's).</param>
public sealed record LadderPlan(ImmutableArray<Temperature> Temperatures, ImmutableArray<bool> Added, ImmutableArray<double> PredictedSwapAcceptance,
    double TargetSwapAcceptance, string Basis);

/// <summary>
/// The acceptance of a replica swap between two temperatures predicted from the distribution of the potential energy:
/// with states E_i (above the minimum) of weight w_i, A(β₁, β₂) = Σ_i Σ_j p₁(i) p₂(j) min(1, e^((β₁ − β₂)(E_i − E_j))),
/// evaluated in one pass over the states sorted by energy (the terms with E_j ≤ E_i are a cumulative sum, the others a
/// suffix sum of w_j e^(−β₁(E_j − E_i))). The states come from the landscape's exact quadrature where it exists (lines and
/// radial pairs) and from a three-dimensional harmonic well's density of states (∝ √E) for sites.
/// </summary>
internal sealed class SwapAcceptance
{
    private const int PairNodes = 20_001;
    private const int HarmonicNodes = 4_000;
    private const int MostAddedPerInterval = 200;

    private readonly double[] _energy;
    private readonly double[] _weight;

    private SwapAcceptance(double[] energy, double[] weight, string basis)
    {
        Array.Sort(energy, weight);
        double min = energy[0];
        for (int i = 0; i < energy.Length; i++)
        {
            energy[i] -= min;
        }
        (_energy, _weight, Basis) = (energy, weight, basis);
    }

    internal string Basis { get; }

    /// <summary>A line's or radial pair's states: the window on a uniform grid of trapezoid weights (× r² for a radial pair), hard-core points left out.</summary>
    internal static SwapAcceptance ForPair<TPotential>(PairLandscape<TPotential> landscape) where TPotential : struct, IPairPotential
    {
        double lo = landscape.WindowLowerInAngstroms, hi = landscape.WindowUpperInAngstroms, h = (hi - lo) / (PairNodes - 1);
        bool radial = landscape.Geometry == SeparationGeometry.Radial;
        var energy = new List<double>(PairNodes);
        var weight = new List<double>(PairNodes);
        for (int i = 0; i < PairNodes; i++)
        {
            double r = lo + i * h;
            double e = landscape.CheckedEnergy(r);
            double w = (i == 0 || i == PairNodes - 1 ? 0.5 : 1) * h * (radial ? r * r : 1);
            if (double.IsFinite(e) && w > 0)
            {
                energy.Add(e);
                weight.Add(w);
            }
        }
        if (energy.Count < 2)
        {
            throw new ArgumentException($"The landscape ({landscape.Description}) has finite energy at fewer than two points of its window; no ladder can be planned.", nameof(landscape));
        }
        return new SwapAcceptance([.. energy], [.. weight], "exact");
    }

    /// <summary>A three-dimensional harmonic well's states from 10⁻⁸·kT_min to 80·kT_max above the minimum, log-spaced, weight √E·dE.</summary>
    internal static SwapAcceptance Harmonic3D(double coldestThermalEnergy, double hottestThermalEnergy)
    {
        double lo = Math.Log(1e-8 * coldestThermalEnergy), hi = Math.Log(80 * hottestThermalEnergy), step = (hi - lo) / (HarmonicNodes - 1);
        var energy = new double[HarmonicNodes + 1];
        var weight = new double[HarmonicNodes + 1];
        for (int i = 0; i < HarmonicNodes; i++)
        {
            double e = Math.Exp(lo + i * step);
            energy[i + 1] = e;
            weight[i + 1] = Math.Sqrt(e) * e * step; // √E dE with dE = E d(ln E)
        }
        return new SwapAcceptance(energy, weight, "harmonic");
    }

    /// <summary>The predicted acceptance of a swap between β₁ and β₂ (1/eV, either order).</summary>
    internal double Between(double beta1, double beta2)
    {
        if (beta1 < beta2)
        {
            (beta1, beta2) = (beta2, beta1);
        }
        int n = _energy.Length;
        double z1 = 0, z2 = 0;
        for (int i = 0; i < n; i++)
        {
            z1 += _weight[i] * Math.Exp(-beta1 * _energy[i]);
            z2 += _weight[i] * Math.Exp(-beta2 * _energy[i]);
        }
        // tail = Σ_{j>i} w_j e^(−β₁(E_j − E_i)), built from the top down.
        var tail = new double[n];
        for (int i = n - 2; i >= 0; i--)
        {
            tail[i] = Math.Exp(-beta1 * (_energy[i + 1] - _energy[i])) * (_weight[i + 1] + tail[i + 1]);
        }
        double acceptance = 0, cumulative = 0;
        for (int i = 0; i < n; i++)
        {
            double p2 = _weight[i] * Math.Exp(-beta2 * _energy[i]) / z2;
            cumulative += p2;
            double p1 = _weight[i] * Math.Exp(-beta1 * _energy[i]) / z1;
            acceptance += p1 * (cumulative + Math.Exp(-beta2 * _energy[i]) * tail[i] / z2);
        }
        return Math.Min(1, acceptance);
    }

    /// <summary>
    /// The ladder through <paramref name="temperatures"/> (at least two, any order, no duplicates) whose every neighbouring
    /// pair has a predicted acceptance of at least <paramref name="target"/>: between two given temperatures, the fewest
    /// geometrically spaced rungs that reach it.
    /// </summary>
    internal LadderPlan Plan(IReadOnlyList<Temperature> temperatures, double target)
    {
        var given = temperatures.Select(t => t.InKelvin).Order().ToArray();
        var rungs = new List<double> { given[0] };
        var added = new List<bool> { false };
        var predicted = new List<double>();
        for (int i = 1; i < given.Length; i++)
        {
            double lo = given[i - 1], hi = given[i];
            for (int m = 0; ; m++)
            {
                if (m > MostAddedPerInterval)
                {
                    throw new ArgumentException(string.Create(CultureInfo.InvariantCulture,
                        $"More than {MostAddedPerInterval} rungs would be needed between {lo:R} K and {hi:R} K for a predicted swap acceptance of {target:R}; lower targetSwapAcceptance or give temperatures closer together."), nameof(temperatures));
                }
                var points = Enumerable.Range(0, m + 2).Select(k => k == 0 ? lo : k == m + 1 ? hi : Round(lo * Math.Pow(hi / lo, (double)k / (m + 1)))).ToArray();
                var accept = Enumerable.Range(0, m + 1).Select(k => Between(Beta(points[k]), Beta(points[k + 1]))).ToArray();
                if (accept.Min() >= target)
                {
                    for (int k = 1; k <= m + 1; k++)
                    {
                        rungs.Add(points[k]);
                        added.Add(k <= m);
                    }
                    predicted.AddRange(accept);
                    break;
                }
            }
        }
        return new LadderPlan([.. rungs.Select(Temperature.FromKelvin)], [.. added], [.. predicted], target, Basis);
    }

    private static double Beta(double kelvin) => 1 / Temperature.FromKelvin(kelvin).ThermalEnergyInElectronVolts;

    /// <summary>An added rung to six significant figures (readable in reports; the prediction uses the rounded value).</summary>
    private static double Round(double kelvin) => double.Parse(kelvin.ToString("G6", CultureInfo.InvariantCulture), CultureInfo.InvariantCulture);
}
