using System;
using System.Collections.Generic;
using System.Linq;
using ThermalSampling.Sampling;
using ThermalSampling.Statistics;

namespace ThermalSampling.Reports;

/// <summary>
/// Multiple-histogram reweighting (Ferrenberg &amp; Swendsen, Phys. Rev. Lett. 63, 1195 (1989)) of the two sampled
/// temperatures that bracket a target, on the records' fine energy bins (<see cref="EnergyBinSums"/>): the runs' bins are
/// coarsened exactly to the wider of their two widths; the density of states per bin solves
/// g_b = (n_ib + n_jb)/Σ_k N_k e^(f_k − β_k E_b), e^(−f_k) = Σ_b g_b e^(−β_k E_b) (E_b the bin's centre), by iteration;
/// then a draw in bin b weighs e^(−βE_b)/Σ_k N_k e^(f_k − β_k E_b) at the target β, and the per-bin sums of the position
/// values give its averages. Draws below V_ref or beyond the bins are left out (their share is reported).
/// </summary>
internal static class HistogramReweighting
{
    /// <summary>Two runs' pooled bins on a common grid, and their solved free energies.</summary>
    internal sealed class Pair
    {
        internal double[] Energies = [];      // E_b − V_ref at bin centres, eV
        internal double[] Denominators = [];  // Σ_k N_k e^(f_k − β_k E_b), relative to a scale (per bin)
        internal double[] Counts = [];        // n_ib + n_jb
        internal double[] Sums = [];          // per bin, Values sums
        internal int Values;
        internal double LeftOut;              // share of the draws below V_ref or beyond the bins
    }

    /// <summary>The share Σ_b min(p_i, p_j) of two runs' energy histograms on their common grid.</summary>
    internal static double Overlap(IReadOnlyList<ChainRecord> a, IReadOnlyList<ChainRecord> b)
    {
        double width = Math.Max(a[0].Reweighting.Width, b[0].Reweighting.Width);
        var (ca, _, _) = Coarse(a, width, skip: -1);
        var (cb, _, _) = Coarse(b, width, skip: -1);
        double na = ca.Sum(), nb = cb.Sum();
        double overlap = 0;
        for (int i = 0; i < ca.Length; i++)
        {
            overlap += Math.Min(ca[i] / na, cb[i] / nb);
        }
        return overlap;
    }

    /// <summary>Counts and sums of <paramref name="chains"/> (without group <paramref name="skip"/>: chain ⌊skip/G⌋'s group skip mod G) on bins of <paramref name="width"/>, and the draws left out.</summary>
    private static (double[] Counts, double[] Sums, double LeftOut) Coarse(IReadOnlyList<ChainRecord> chains, double width, int skip)
    {
        var first = chains[0].Reweighting;
        int factor = (int)Math.Round(width / first.Width);
        int bins = (EnergyBinSums.Bins + factor - 1) / factor, values = first.Values;
        var counts = new double[bins];
        var sums = new double[bins * values];
        double leftOut = 0;
        foreach (var chain in chains)
        {
            var r = chain.Reweighting;
            int f = (int)Math.Round(width / r.Width);
            for (int g = 0; g < EnergyBinSums.Groups; g++)
            {
                if (chain.Chain * EnergyBinSums.Groups + g == skip)
                {
                    continue;
                }
                int at = g * EnergyBinSums.Slots;
                leftOut += r.Counts[at] + r.Counts[at + EnergyBinSums.Slots - 1];
                for (int slot = 1; slot <= EnergyBinSums.Bins; slot++)
                {
                    int bin = (slot - 1) / f;
                    if (bin >= bins)
                    {
                        leftOut += r.Counts[at + slot];
                        continue;
                    }
                    counts[bin] += r.Counts[at + slot];
                    for (int k = 0; k < values; k++)
                    {
                        sums[bin * values + k] += r.Sums[(at + slot) * values + k];
                    }
                }
            }
        }
        return (counts, sums, leftOut);
    }

    /// <summary>Solves the two runs (β <paramref name="betaA"/>, <paramref name="betaB"/>) without jackknife group <paramref name="skip"/> (chain·G + group; −1: none).</summary>
    internal static Pair Solve(IReadOnlyList<ChainRecord> a, double betaA, IReadOnlyList<ChainRecord> b, double betaB, int skip)
    {
        double width = Math.Max(a[0].Reweighting.Width, b[0].Reweighting.Width);
        var (ca, sa, la) = Coarse(a, width, skip);
        var (cb, sb, lb) = Coarse(b, width, skip);
        int bins = Math.Min(ca.Length, cb.Length), values = a[0].Reweighting.Values;
        double na = ca.Sum(), nb = cb.Sum();
        var energies = new double[bins];
        var counts = new double[bins];
        var sums = new double[bins * values];
        for (int i = 0; i < bins; i++)
        {
            energies[i] = (i + 0.5) * width;
            counts[i] = ca[i] + cb[i];
            for (int k = 0; k < values; k++)
            {
                sums[i * values + k] = sa[i * values + k] + sb[i * values + k];
            }
        }
        // Self-consistent f_a, f_b (f_a = 0 fixes the scale); log-sum-exp throughout.
        double fa = 0, fb = 0;
        var logDen = new double[bins];
        for (int iteration = 0; iteration < 10_000; iteration++)
        {
            for (int i = 0; i < bins; i++)
            {
                logDen[i] = LogAdd(Math.Log(Math.Max(na, 1e-300)) + fa - betaA * energies[i], Math.Log(Math.Max(nb, 1e-300)) + fb - betaB * energies[i]);
            }
            double newFa = -LogSum(bins, i => counts[i] > 0 ? Math.Log(counts[i]) - logDen[i] - betaA * energies[i] : double.NegativeInfinity);
            double newFb = -LogSum(bins, i => counts[i] > 0 ? Math.Log(counts[i]) - logDen[i] - betaB * energies[i] : double.NegativeInfinity);
            newFb -= newFa;
            bool done = Math.Abs(newFb - fb) < 1e-13 * Math.Max(1, Math.Abs(newFb));
            fb = newFb;
            if (done)
            {
                break;
            }
        }
        for (int i = 0; i < bins; i++)
        {
            logDen[i] = LogAdd(Math.Log(Math.Max(na, 1e-300)) + fa - betaA * energies[i], Math.Log(Math.Max(nb, 1e-300)) + fb - betaB * energies[i]);
        }
        double total = na + nb + la + lb;
        return new Pair { Energies = energies, Denominators = logDen, Counts = counts, Sums = sums, Values = values, LeftOut = (la + lb) / Math.Max(total, 1) };
    }

    /// <summary>
    /// At β: the averages of the position values (<see cref="Pair.Values"/> of them) and of E − V_ref.
    /// </summary>
    internal static (double[] Averages, double Energy) Average(Pair pair, double beta)
    {
        int bins = pair.Energies.Length, values = pair.Values;
        // log weight of a draw in bin i: −βE_i − logDen_i; shift by the largest over occupied bins.
        double top = double.NegativeInfinity;
        for (int i = 0; i < bins; i++)
        {
            if (pair.Counts[i] > 0)
            {
                top = Math.Max(top, -beta * pair.Energies[i] - pair.Denominators[i]);
            }
        }
        double z = 0, energy = 0;
        var sums = new double[values];
        for (int i = 0; i < bins; i++)
        {
            if (pair.Counts[i] <= 0)
            {
                continue;
            }
            double w = Math.Exp(-beta * pair.Energies[i] - pair.Denominators[i] - top);
            z += w * pair.Counts[i];
            energy += w * pair.Counts[i] * pair.Energies[i];
            for (int k = 0; k < values; k++)
            {
                sums[k] += w * pair.Sums[i * values + k];
            }
        }
        for (int k = 0; k < values; k++)
        {
            sums[k] /= z;
        }
        return (sums, energy / z);
    }

    private static double LogAdd(double a, double b)
    {
        double m = Math.Max(a, b);
        return double.IsNegativeInfinity(m) ? m : m + Math.Log(Math.Exp(a - m) + Math.Exp(b - m));
    }

    private static double LogSum(int n, Func<int, double> term)
    {
        double m = double.NegativeInfinity;
        for (int i = 0; i < n; i++)
        {
            m = Math.Max(m, term(i));
        }
        if (double.IsNegativeInfinity(m))
        {
            return m;
        }
        double s = 0;
        for (int i = 0; i < n; i++)
        {
            s += Math.Exp(term(i) - m);
        }
        return m + Math.Log(s);
    }
}
