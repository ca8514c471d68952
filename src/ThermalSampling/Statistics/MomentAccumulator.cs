using System;

namespace ThermalSampling.Statistics;

/// <summary>
/// Streaming, mergeable first four moments of a series in constant memory: count, mean and the sums of the 2nd, 3rd
/// and 4th powers of deviations from the mean. Updates follow Pébay, Sandia report SAND2008-6212 (2008); merging two
/// accumulators is exact up to rounding (Chan, Golub &amp; LeVeque 1979, 1983; Pébay 2008), so runs can be split over
/// chains, shards or checkpoints and combined.
/// </summary>
/// <remarks>A mutable struct on purpose: it lives inside the sampling loop. Copy it to keep a snapshot.</remarks>
public struct MomentAccumulator
{
    private long _count;
    private double _mean;
    private double _m2;
    private double _m3;
    private double _m4;

    /// <summary>Restores an accumulator from its five numbers (as read from <see cref="Count"/>, <see cref="Mean"/> and the sums).</summary>
    /// <param name="count">The number of values, at least 0.</param>
    /// <param name="mean">The mean.</param>
    /// <param name="sumSquaredDeviations">Σ(x − mean)².</param>
    /// <param name="sumCubedDeviations">Σ(x − mean)³.</param>
    /// <param name="sumFourthPowerDeviations">Σ(x − mean)⁴.</param>
    public static MomentAccumulator FromSums(long count, double mean, double sumSquaredDeviations, double sumCubedDeviations, double sumFourthPowerDeviations)
    {
        if (count < 0)
        {
            throw new ArgumentOutOfRangeException(nameof(count), count, "count must be at least 0.");
        }
        return new MomentAccumulator { _count = count, _mean = mean, _m2 = sumSquaredDeviations, _m3 = sumCubedDeviations, _m4 = sumFourthPowerDeviations };
    }

    /// <summary>How many values were added.</summary>
    public readonly long Count => _count;

    /// <summary>The mean (0 when empty).</summary>
    public readonly double Mean => _mean;

    /// <summary>Σ(x − mean)².</summary>
    public readonly double SumSquaredDeviations => _m2;

    /// <summary>Σ(x − mean)³.</summary>
    public readonly double SumCubedDeviations => _m3;

    /// <summary>Σ(x − mean)⁴.</summary>
    public readonly double SumFourthPowerDeviations => _m4;

    /// <summary>The unbiased sample variance Σ(x − mean)²/(n − 1); NaN-free: 0 for fewer than two values.</summary>
    public readonly double Variance => _count > 1 ? _m2 / (_count - 1) : 0;

    /// <summary>The second central moment Σ(x − mean)²/n.</summary>
    public readonly double CentralMoment2 => _count > 0 ? _m2 / _count : 0;

    /// <summary>The third central moment Σ(x − mean)³/n.</summary>
    public readonly double CentralMoment3 => _count > 0 ? _m3 / _count : 0;

    /// <summary>The fourth central moment Σ(x − mean)⁴/n.</summary>
    public readonly double CentralMoment4 => _count > 0 ? _m4 / _count : 0;

    /// <summary>The skewness m3/m2^(3/2) (0 when the spread is zero).</summary>
    public readonly double Skewness => _m2 > 0 ? Math.Sqrt(_count) * _m3 / Math.Pow(_m2, 1.5) : 0;

    /// <summary>The excess kurtosis m4/m2² − 3 (0 when the spread is zero).</summary>
    public readonly double ExcessKurtosis => _m2 > 0 ? _count * _m4 / (_m2 * _m2) - 3 : 0;

    /// <summary>Adds one value.</summary>
    /// <param name="value">The value; the caller guarantees it is finite (kernels never produce NaN positions).</param>
    public void Add(double value)
    {
        long n1 = _count;
        _count++;
        double n = _count;
        double delta = value - _mean;
        double deltaN = delta / n;
        double deltaN2 = deltaN * deltaN;
        double term1 = delta * deltaN * n1;
        _mean += deltaN;
        _m4 += term1 * deltaN2 * (n * n - 3 * n + 3) + 6 * deltaN2 * _m2 - 4 * deltaN * _m3;
        _m3 += term1 * deltaN * (n - 2) - 3 * deltaN * _m2;
        _m2 += term1;
    }

    /// <summary>The accumulator of the concatenation of both series.</summary>
    /// <param name="a">The first part.</param>
    /// <param name="b">The second part.</param>
    public static MomentAccumulator Merge(in MomentAccumulator a, in MomentAccumulator b)
    {
        if (a._count == 0)
        {
            return b;
        }
        if (b._count == 0)
        {
            return a;
        }
        double na = a._count, nb = b._count, n = na + nb;
        double delta = b._mean - a._mean;
        double d2 = delta * delta, d3 = d2 * delta, d4 = d2 * d2;
        return new MomentAccumulator
        {
            _count = a._count + b._count,
            _mean = a._mean + delta * nb / n,
            _m2 = a._m2 + b._m2 + d2 * na * nb / n,
            _m3 = a._m3 + b._m3 + d3 * na * nb * (na - nb) / (n * n) + 3 * delta * (na * b._m2 - nb * a._m2) / n,
            _m4 = a._m4 + b._m4 + d4 * na * nb * (na * na - na * nb + nb * nb) / (n * n * n)
                + 6 * d2 * (na * na * b._m2 + nb * nb * a._m2) / (n * n) + 4 * delta * (na * b._m3 - nb * a._m3) / n,
        };
    }
}
