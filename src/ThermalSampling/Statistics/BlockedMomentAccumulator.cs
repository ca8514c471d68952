using System.Runtime.CompilerServices;

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
    private const int BlockSize = 4096;
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

    /// <summary>Everything added so far, merged.</summary>
    internal MomentAccumulator Complete()
    {
        Flush();
        return _total;
    }

    private void Flush()
    {
        if (_count == 0)
        {
            return;
        }
        double n = _count, m = _s1 / n;
        // Central sums of the block from its raw sums about the reference.
        double m2 = _s2 - _s1 * m;
        double m3 = _s3 - 3 * m * _s2 + 2 * m * m * _s1;
        double m4 = _s4 - 4 * m * _s3 + 6 * m * m * _s2 - 3 * m * m * m * _s1;
        var block = MomentAccumulator.FromSums(_count, _reference + m, m2 < 0 ? 0 : m2, m3, m4 < 0 ? 0 : m4);
        _total = MomentAccumulator.Merge(_total, block);
        _count = 0;
        _s1 = _s2 = _s3 = _s4 = 0;
    }
}
