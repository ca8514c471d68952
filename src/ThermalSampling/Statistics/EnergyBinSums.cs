using System;
using ThermalSampling.Persistence;

namespace ThermalSampling.Statistics;

/// <summary>
/// What reweighting across temperatures needs from a chain, in constant memory: a fine histogram of the potential energy
/// (512 bins of width w = 2^⌊log₂(kT/16)⌋ eV above V_ref, plus the counts below and beyond) and, per bin, the sums of
/// the position values (a pair: x − ref and (x − ref)²; a site: the three displacements from the minimum and their six
/// products), kept apart for <see cref="Groups"/> groups of consecutive draws (the jackknife's units: rare excursions make
/// a jackknife over a few whole chains too optimistic). Every fourth recorded draw is counted (draws 0, 4, 8, … of the
/// chain: consecutive draws are correlated, and the rule is the same at every lane width). Bins of different temperatures
/// nest (powers of two above the same V_ref), so two runs' bins coarsen to a common grid exactly.
/// </summary>
internal sealed class EnergyBinSums
{
    /// <summary>The fine bins.</summary>
    internal const int Bins = 512;

    /// <summary>Bins plus below and beyond.</summary>
    internal const int Slots = Bins + 2;

    /// <summary>Every this-many-th recorded draw is counted.</summary>
    internal const int Stride = 4;

    /// <summary>Groups of consecutive draws per chain: draw n of N belongs to group ⌊n·G/N⌋.</summary>
    internal const int Groups = 8;

    private readonly long _samples;

    private readonly double _scale;

    /// <param name="reference">V_ref, eV.</param>
    /// <param name="width">The bin width w, eV (a power of two).</param>
    /// <param name="values">Values summed per bin: 2 (pair) or 9 (site).</param>
    /// <param name="samples">The chain's recorded draws (for the groups).</param>
    internal EnergyBinSums(double reference, double width, int values, long samples)
    {
        (Reference, Width, Values, _samples) = (reference, width, values, samples);
        _scale = 1 / width;
        Counts = new long[Groups * Slots];
        Sums = new double[Groups * Slots * values];
    }

    /// <summary>The fine width for a chain at kT whose energy histogram has width <paramref name="coarseWidth"/> (kT/8 rounded down to a power of two): half of it.</summary>
    internal static double WidthFromCoarse(double coarseWidth) => coarseWidth / 2;

    /// <summary>The group of draw <paramref name="index"/> of <paramref name="samples"/>.</summary>
    internal static int GroupOf(long index, long samples) => (int)(index * Groups / samples);

    internal double Reference { get; }

    internal double Width { get; }

    internal int Values { get; }

    /// <summary>Draws per group and slot (group-major; per group: below, the bins, beyond).</summary>
    internal long[] Counts { get; }

    /// <summary>Per group and slot, <see cref="Values"/> sums.</summary>
    internal double[] Sums { get; }

    /// <summary>The slot of energy <paramref name="energy"/> (eV): 0 below V_ref, 1 + ⌊(V − V_ref)/w⌋ within, <see cref="Slots"/> − 1 beyond (the lane kernels' arithmetic).</summary>
    internal int SlotOf(double energy)
    {
        double t = Math.FusedMultiplyAdd(energy - Reference, _scale, 1.0);
        t = t < 1.0 ? 0.0 : t;
        return t < Slots - 1 ? (int)t : Slots - 1;
    }

    /// <summary>Counts draw number <paramref name="index"/> (0-based) if it is a fourth one.</summary>
    internal void Add(long index, double energy, ReadOnlySpan<double> values)
    {
        if (index % Stride != 0)
        {
            return;
        }
        int slot = GroupOf(index, _samples) * Slots + SlotOf(energy);
        Counts[slot]++;
        for (int k = 0; k < Values; k++)
        {
            Sums[slot * Values + k] += values[k];
        }
    }

    /// <summary>Adds counts and sums gathered elsewhere (the lane tallies).</summary>
    internal void AddAll(ReadOnlySpan<long> counts, ReadOnlySpan<double> sums)
    {
        for (int i = 0; i < Counts.Length; i++)
        {
            Counts[i] += counts[i];
        }
        for (int i = 0; i < Sums.Length; i++)
        {
            Sums[i] += sums[i];
        }
    }

    internal void Save(StateWriter w)
    {
        w.Longs("RWCN", Counts);
        w.Doubles("RWSM", Sums);
    }

    internal void Load(StateReader r)
    {
        r.Longs("RWCN", Counts.Length).CopyTo(Counts, 0);
        r.DoublesInto("RWSM", Sums);
    }
}
