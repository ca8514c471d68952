using System.Runtime.CompilerServices;

using ThermalSampling.Persistence;

namespace ThermalSampling.Statistics;

/// <summary>
/// The sampling loops' moment accumulator: raw power sums of x − ref over blocks of 4096 values (no division per value),
/// each block turned into central sums and merged into a <see cref="MomentAccumulator"/> by the exact pairwise rule.
/// The reference is re-taken from the first value of every block, so the raw sums stay small and the conversion loses
/// no meaningful precision. Written by hand because it is in the per-step loop (a division per step costs more than
/// the rest of the bookkeeping).
/// </summary>
internal struct BlockedMomentAccumulator
{
    internal const int BlockSize = 4096;
    private MomentAccumulator _total;
    private double _reference, _s1, _s2, _s3, _s4;
    private int _count;

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal void Add(double x)
    {
        if (_count == 0)
        {
            _reference = x;
        }
        double d = x - _reference, d2 = d * d;
        _s1 += d;
        _s2 += d2;
        _s3 += d2 * d;
        _s4 += d2 * d2;
        if (++_count == BlockSize)
        {
            Flush();
        }
    }

    /// <summary>Writes the merged total and the open block.</summary>
    internal readonly void Save(StateWriter w)
    {
        w.Longs("BMOC", [_total.Count, _count]);
        w.Doubles("BMOS", [_total.Mean, _total.SumSquaredDeviations, _total.SumCubedDeviations, _total.SumFourthPowerDeviations, _reference, _s1, _s2, _s3, _s4]);
    }

    /// <summary>Restores what <see cref="Save"/> wrote.</summary>
    internal void Load(StateReader r)
    {
        var counts = r.Longs("BMOC", 2);
        var v = r.Doubles("BMOS", 9);
        _total = MomentAccumulator.FromSums(r.InRange(counts[0], 0, long.MaxValue, "the moment count"), v[0], v[1], v[2], v[3]);
        _count = (int)r.InRange(counts[1], 0, BlockSize - 1, "the open block's count");
        (_reference, _s1, _s2, _s3, _s4) = (v[4], v[5], v[6], v[7], v[8]);
    }

    /// <summary>Everything added so far, merged (the open block included; the accumulator itself is left as it is).</summary>
    internal readonly MomentAccumulator Complete()
    {
        var copy = this;
        copy.Flush();
        return copy._total;
    }

    /// <summary>Values added so far.</summary>
    internal readonly long Count => _total.Count + _count;

    private void Flush()
    {
        if (_count == 0)
        {
            return;
        }
        AddBlock(_count, _reference, _s1, _s2, _s3, _s4);
        _count = 0;
        _s1 = _s2 = _s3 = _s4 = 0;
    }

    /// <summary>Merges a finished block given by its count and raw power sums of x − reference.</summary>
    internal void AddBlock(int count, double reference, double s1, double s2, double s3, double s4)
    {
        double n = count, m = s1 / n;
        // Central sums of the block from its raw sums about the reference.
        double m2 = s2 - s1 * m;
        double m3 = s3 - 3 * m * s2 + 2 * m * m * s1;
        double m4 = s4 - 4 * m * s3 + 6 * m * m * s2 - 3 * m * m * m * s1;
        var block = MomentAccumulator.FromSums(count, reference + m, m2 < 0 ? 0 : m2, m3, m4 < 0 ? 0 : m4);
        _total = MomentAccumulator.Merge(_total, block);
    }
}
