using System;
using System.Collections.Generic;
using System.Collections.Immutable;
using System.Linq;
using System.Runtime.InteropServices;
using ThermalSampling.Statistics;
using ThermalSampling.Persistence;

namespace ThermalSampling.Statistics;

/// <summary>
/// Keeps a constant-size record of one chain for diagnostics: the means of consecutive batches of k draws
/// (k = ⌈N / cap⌉) of (x − ref) and of (x − ref)². The mean of all draws is the mean of the batch means, so
/// Var(x̄) = Var(batch mean)·τ_batch/M holds for any k, and the batch means of (x − μ)² follow exactly once μ is known.
/// With k = 1 these are the draws themselves.
/// </summary>
internal sealed class BatchMeansStore
{
    private readonly double _reference;
    private double _sum1, _sum2;
    private int _filled;
    private int _batch;

    internal BatchMeansStore(long samples, int cap, double reference)
    {
        BatchSize = (int)Math.Max(1, (samples + cap - 1) / cap);
        int batches = (int)(samples / BatchSize);
        First = new double[batches];
        Second = new double[batches];
        _reference = reference;
    }

    internal int BatchSize { get; }

    internal double Reference => _reference;

    /// <summary>Batch means of x − ref.</summary>
    internal double[] First { get; }

    /// <summary>Batch means of (x − ref)².</summary>
    internal double[] Second { get; }

    internal void Add(double x)
    {
        if (_batch >= First.Length)
        {
            return; // the remainder of N/k draws is in the moments, not in the batch series
        }
        double d = x - _reference;
        _sum1 += d;
        _sum2 += d * d;
        if (++_filled == BatchSize)
        {
            First[_batch] = _sum1 / BatchSize;
            Second[_batch] = _sum2 / BatchSize;
            _batch++;
            _filled = 0;
            _sum1 = _sum2 = 0;
        }
    }

    /// <summary>Adds a finished batch given by its sums of x − ref and (x − ref)² (the lane kernels' path; same arithmetic as <see cref="Add"/>).</summary>
    internal void AddBatchSums(double sum1, double sum2)
    {
        if (_batch < First.Length)
        {
            First[_batch] = sum1 / BatchSize;
            Second[_batch] = sum2 / BatchSize;
            _batch++;
        }
    }

    /// <summary>Sets the open batch (the draws after the last closed batch) from its count and sums (the lane kernels' path, at the end of a run).</summary>
    internal void SetOpenBatch(int count, double sum1, double sum2) => (_filled, _sum1, _sum2) = (count, sum1, sum2);

    /// <summary>Every draw's mean and (population) variance of x, from the closed batches and the open one: exact, however the draws were batched.</summary>
    internal (long Count, double Mean, double Variance) Totals()
    {
        double s1 = _sum1, s2 = _sum2;
        for (int i = 0; i < _batch; i++)
        {
            s1 += First[i] * BatchSize;
            s2 += Second[i] * BatchSize;
        }
        long n = (long)_batch * BatchSize + _filled;
        if (n == 0)
        {
            return (0, double.NaN, double.NaN);
        }
        double m = s1 / n;
        return (n, _reference + m, Math.Max(s2 / n - m * m, 0));
    }

    /// <summary>Writes the closed batches and the open batch's sums.</summary>
    internal void Save(StateWriter w)
    {
        w.Longs("BMIX", [_batch, _filled]);
        w.Doubles("BMSU", [_sum1, _sum2]);
        w.Doubles("BMM1", First.AsSpan(0, _batch));
        w.Doubles("BMM2", Second.AsSpan(0, _batch));
    }

    /// <summary>Restores what <see cref="Save"/> wrote into a store made with the same sizes.</summary>
    internal void Load(StateReader r)
    {
        var index = r.Longs("BMIX", 2);
        _batch = (int)r.InRange(index[0], 0, First.Length, "the number of closed batches");
        _filled = (int)r.InRange(index[1], 0, BatchSize - 1, "the draws in the open batch");
        var sums = r.Doubles("BMSU", 2);
        (_sum1, _sum2) = (sums[0], sums[1]);
        r.DoublesInto("BMM1", First.AsSpan(0, _batch));
        r.DoublesInto("BMM2", Second.AsSpan(0, _batch));
    }

    /// <summary>Batch means of x itself.</summary>
    internal double[] Means()
    {
        var result = new double[First.Length];
        for (int i = 0; i < result.Length; i++)
        {
            result[i] = First[i] + _reference;
        }
        return result;
    }

    /// <summary>Batch means of (x − μ)² for the final mean μ.</summary>
    internal double[] SquaredDeviationMeans(double mean)
    {
        double m = mean - _reference;
        var result = new double[First.Length];
        for (int i = 0; i < result.Length; i++)
        {
            result[i] = Second[i] - 2 * m * First[i] + m * m;
        }
        return result;
    }
}

/// <summary>Keeps the first draws of a chain, up to a cap.</summary>
/// <typeparam name="T">The draw type.</typeparam>
internal sealed class DrawRecorder<T> where T : struct
{
    private readonly T[] _items;
    private int _count;

    internal DrawRecorder(long samples, int cap) => _items = new T[(int)Math.Min(samples, cap)];

    [System.Runtime.CompilerServices.MethodImpl(System.Runtime.CompilerServices.MethodImplOptions.AggressiveInlining)]
    internal void Add(T item)
    {
        if (_count < _items.Length)
        {
            _items[_count++] = item;
        }
    }

    internal int Capacity => _items.Length;

    /// <summary>Writes the kept draws, each as <paramref name="values"/> doubles (T must be doubles only).</summary>
    internal void Save(StateWriter w, int values)
        => w.Doubles("DRAW", MemoryMarshal.Cast<T, double>(_items.AsSpan(0, _count)));

    /// <summary>Restores what <see cref="Save"/> wrote.</summary>
    internal void Load(StateReader r, int values)
    {
        var doubles = r.Doubles("DRAW", -1, (long)values * _items.Length);
        if (doubles.Length % values != 0)
        {
            throw new CheckpointException("The checkpoint's retained draws do not divide into whole draws.");
        }
        _count = doubles.Length / values;
        doubles.AsSpan().CopyTo(MemoryMarshal.Cast<T, double>(_items.AsSpan()));
    }

    internal ImmutableArray<T> ToImmutable() => ImmutableArray.Create(_items, 0, _count);

}

/// <summary>Counts draws into fixed bins.</summary>
internal sealed class BinCounter
{
    private readonly double _lower, _scale;

    internal BinCounter(double lower, double upper, int bins)
    {
        _lower = lower;
        Upper = upper;
        _scale = bins / (upper - lower);
        Counts = new long[bins];
    }

    internal double Lower => _lower;

    internal double Upper { get; }

    internal double Scale => _scale;

    internal long[] Counts { get; }

    /// <summary>Counts <paramref name="x"/>; values outside [lower, upper] are not counted, and the upper edge (or a value rounding onto it) goes to the last bin.</summary>
    internal void Add(double x)
    {
        if (x >= _lower && x <= Upper)
        {
            Counts[Math.Min((int)((x - _lower) * _scale), Counts.Length - 1)]++;
        }
    }

    internal void Save(StateWriter w) => w.Longs("BINS", Counts);

    internal void Load(StateReader r) => r.Longs("BINS", Counts.Length).CopyTo(Counts, 0);

    /// <summary>Adds counts gathered elsewhere (one per bin).</summary>
    internal void AddCounts(ReadOnlySpan<long> counts)
    {
        for (int i = 0; i < Counts.Length; i++)
        {
            Counts[i] += counts[i];
        }
    }

}

/// <summary>Mergeable running mean vector and co-moment matrix of 3D positions (Chan et al. 1979 pairwise update).</summary>
internal struct CovarianceAccumulator
{
    internal long Count;
    internal double MeanX, MeanY, MeanZ;
    internal double Cxx, Cyy, Czz, Cxy, Cxz, Cyz;

    internal void Add(double x, double y, double z)
    {
        Count++;
        double dx = x - MeanX, dy = y - MeanY, dz = z - MeanZ;
        double inv = 1.0 / Count;
        MeanX += dx * inv;
        MeanY += dy * inv;
        MeanZ += dz * inv;
        double ex = x - MeanX, ey = y - MeanY, ez = z - MeanZ;
        Cxx += dx * ex;
        Cyy += dy * ey;
        Czz += dz * ez;
        Cxy += dx * ey;
        Cxz += dx * ez;
        Cyz += dy * ez;
    }

    /// <summary>A block of n positions from its raw sums about a reference point: Σd, Σd² and Σ of the cross products of d = p − ref.</summary>
    internal static CovarianceAccumulator FromRawSums(long n, double refX, double refY, double refZ, double sx, double sy, double sz,
        double sxx, double syy, double szz, double sxy, double sxz, double syz)
    {
        double mx = sx / n, my = sy / n, mz = sz / n;
        return new CovarianceAccumulator
        {
            Count = n,
            MeanX = refX + mx,
            MeanY = refY + my,
            MeanZ = refZ + mz,
            Cxx = Math.Max(sxx - sx * mx, 0),
            Cyy = Math.Max(syy - sy * my, 0),
            Czz = Math.Max(szz - sz * mz, 0),
            Cxy = sxy - sx * my,
            Cxz = sxz - sx * mz,
            Cyz = syz - sy * mz,
        };
    }

    internal readonly void Save(StateWriter w)
    {
        w.Longs("COVN", [Count]);
        w.Doubles("COVS", [MeanX, MeanY, MeanZ, Cxx, Cyy, Czz, Cxy, Cxz, Cyz]);
    }

    internal static CovarianceAccumulator Load(StateReader r)
    {
        long n = r.InRange(r.Longs("COVN", 1)[0], 0, long.MaxValue, "the covariance count");
        var v = r.Doubles("COVS", 9);
        return new CovarianceAccumulator { Count = n, MeanX = v[0], MeanY = v[1], MeanZ = v[2], Cxx = v[3], Cyy = v[4], Czz = v[5], Cxy = v[6], Cxz = v[7], Cyz = v[8] };
    }

    internal static CovarianceAccumulator Merge(in CovarianceAccumulator a, in CovarianceAccumulator b)
    {
        if (a.Count == 0)
        {
            return b;
        }
        if (b.Count == 0)
        {
            return a;
        }
        double na = a.Count, nb = b.Count, n = na + nb, f = na * nb / n;
        double dx = b.MeanX - a.MeanX, dy = b.MeanY - a.MeanY, dz = b.MeanZ - a.MeanZ;
        return new CovarianceAccumulator
        {
            Count = a.Count + b.Count,
            MeanX = a.MeanX + dx * nb / n,
            MeanY = a.MeanY + dy * nb / n,
            MeanZ = a.MeanZ + dz * nb / n,
            Cxx = a.Cxx + b.Cxx + dx * dx * f,
            Cyy = a.Cyy + b.Cyy + dy * dy * f,
            Czz = a.Czz + b.Czz + dz * dz * f,
            Cxy = a.Cxy + b.Cxy + dx * dy * f,
            Cxz = a.Cxz + b.Cxz + dx * dz * f,
            Cyz = a.Cyz + b.Cyz + dy * dz * f,
        };
    }

}

/// <summary>Autocorrelation-based diagnostics over the batch-mean series of several chains.</summary>
internal static class ChainDiagnostics
{
    internal sealed record Summary(double Tau, double Ess, double BlockingStandardError, bool AllReliable, string Reason, double? RHat);

    /// <summary>
    /// Per chain: Var(x̄_c) = Var(Y)·τ_Y/M from its M batch means Y, and ESS_c = σ²/Var(x̄_c). The pooled mean is the
    /// plain average of the C chain means (every chain records the same number of draws), so Var(x̄) = Σ_c Var(x̄_c)/C²,
    /// ESS = σ²/Var(x̄) = C²/Σ_c(1/ESS_c) and τ = CN/ESS. Adding the ESS_c instead would give 1/Σ_c(1/Var(x̄_c)), the
    /// variance of an inverse-variance weighted mean, which is smaller than that of the plain average whenever the chains'
    /// estimates differ (by noise or because each chain adapted its own width): with four chains of 4000 draws the error
    /// bars of the mean came out about 9% too small. Blocking (Flyvbjerg–Petersen) on each Y series gives an independent
    /// standard error of the pooled mean.
    /// R-hat is computed on the batch means, averaged in groups down to at most <see cref="RHatValuesPerChain"/> per chain.
    /// </summary>
    /// <param name="batchMeansPerChain">Batch means per chain, all of the same length.</param>
    /// <param name="batchSize">Draws per batch.</param>
    /// <param name="samplesPerChain">Recorded draws per chain.</param>
    /// <param name="variancePerDraw">The pooled variance of one draw.</param>
    /// <param name="withRHat">Whether to compute R-hat (the squared-deviation series need only their ESS).</param>
    internal static Summary Summarise(IReadOnlyList<double[]> batchMeansPerChain, int batchSize, long samplesPerChain, double variancePerDraw, bool withRHat = true)
    {
        double sumOfInverseChainEss = 0;
        bool reliable = true;
        string reason = "";
        double blockingVariance = 0;
        foreach (var y in batchMeansPerChain)
        {
            var est = Autocorrelation.Estimate(y);
            double varianceOfChainMean = VarianceOfChainMean(y, est);
            // ESS_c = σ²/Var(x̄_c), at most ten times the draw count (an anticorrelated series can claim more); a constant chain counts its draws.
            double chainEss = variancePerDraw > 0 && varianceOfChainMean > 0 ? Math.Min(variancePerDraw / varianceOfChainMean, samplesPerChain * 10.0) : samplesPerChain;
            sumOfInverseChainEss += 1 / chainEss;
            if (!est.IsReliable && reliable)
            {
                reliable = false;
                reason = batchSize == 1 ? est.Reason : est.Reason + string.Create(System.Globalization.CultureInfo.InvariantCulture, $" (measured on batch means of {batchSize} draws)");
            }
            double se = Blocking.Estimate(y).StandardError;
            blockingVariance += se * se;
        }
        int chains = batchMeansPerChain.Count;
        double total = (double)chains * samplesPerChain;
        double ess = (double)chains * chains / sumOfInverseChainEss; // σ²/Var(x̄) with Var(x̄) = Σ_c (σ²/ESS_c)/C²
        double? rHat = chains >= 2 && withRHat ? RHat.Compute(Coarsened(batchMeansPerChain, RHatValuesPerChain)) : null;
        return new Summary(total / ess, ess, Math.Sqrt(blockingVariance) / chains, reliable, reason, rHat);
    }

    /// <summary>R-hat's input per chain: more values add cost (a pooled rank sort) and no information about mixing.</summary>
    internal const int RHatValuesPerChain = 1024;

    /// <summary>Averages consecutive groups of g = ⌈length / cap⌉ values (longer batches of the same draws), dropping the remainder.</summary>
    internal static IReadOnlyList<double[]> Coarsened(IReadOnlyList<double[]> series, int cap)
    {
        int n = series[0].Length;
        int g = (n + cap - 1) / cap;
        if (g <= 1)
        {
            return series;
        }
        return series.Select(y =>
        {
            var result = new double[n / g];
            for (int i = 0; i < result.Length; i++)
            {
                double sum = 0;
                for (int j = 0; j < g; j++)
                {
                    sum += y[i * g + j];
                }
                result[i] = sum / g;
            }
            return result;
        }).ToList();
    }

    /// <summary>The standard error of the pooled mean of a batch-mean series, Σ_c Var(Y_c)·τ_c/M over chains, without needing the per-draw variance.</summary>
    internal static double PooledMeanStandardError(IReadOnlyList<double[]> batchMeansPerChain)
    {
        double sum = 0;
        foreach (var y in batchMeansPerChain)
        {
            sum += VarianceOfChainMean(y, Autocorrelation.Estimate(y));
        }
        return Math.Sqrt(sum) / batchMeansPerChain.Count;
    }

    /// <summary>Var(x̄_c) = Var(Y)·τ_Y/M of one chain from its M batch means Y and their autocorrelation estimate.</summary>
    private static double VarianceOfChainMean(double[] y, AutocorrelationEstimate est)
    {
        // Identical values (a chain that never moved) have no variance, even though their computed mean can be an ulp off
        // and leave ulp-sized deviations, which would claim an effective sample size of ten times the draws.
        if (Array.TrueForAll(y, v => v == y[0]))
        {
            return 0;
        }
        double meanY = y.Average(), varY = 0;
        foreach (double v in y)
        {
            varY += (v - meanY) * (v - meanY);
        }
        varY /= y.Length - 1;
        return varY * Math.Max(est.IntegratedTime, 1.0 / y.Length) / y.Length;
    }
}
