using System;
using System.Collections.Immutable;
using System.Globalization;
using ThermalSampling.Internal;

namespace ThermalSampling.Statistics;

/// <summary>One level of a blocking analysis.</summary>
/// <param name="BlockSize">Values per block (2^level).</param>
/// <param name="BlockCount">Number of blocks.</param>
/// <param name="StandardError">The standard error of the mean estimated from the block means, √(c0/(n − 1)).</param>
/// <param name="StandardErrorUncertainty">Its own uncertainty, SE/√(2(n − 1)).</param>
public sealed record BlockingLevel(long BlockSize, long BlockCount, double StandardError, double StandardErrorUncertainty);

/// <summary>The result of a blocking analysis: every level and the one chosen as the plateau.</summary>
/// <param name="Levels">All levels with at least 2 blocks, block size 1 first.</param>
/// <param name="ChosenLevel">The index into <paramref name="Levels"/> of the plateau.</param>
/// <param name="IsReliable">Whether a plateau was found among levels with at least 16 blocks.</param>
/// <param name="Reason">Why not, in plain words; empty when reliable.</param>
public sealed record BlockingEstimate(ImmutableArray<BlockingLevel> Levels, int ChosenLevel, bool IsReliable, string Reason)
{
    /// <summary>The standard error of the mean at the chosen level.</summary>
    public double StandardError => Levels[ChosenLevel].StandardError;
}

/// <summary>
/// The standard error of the mean of a correlated series by repeated halving (Flyvbjerg &amp; Petersen,
/// J. Chem. Phys. 91, 461 (1989)).
/// </summary>
public static class Blocking
{
    /// <summary>Levels with fewer blocks than this are shown but never chosen.</summary>
    public const int MinimumBlocksForPlateau = 16;

    /// <summary>Runs the analysis.</summary>
    /// <param name="series">The series; at least 4 values, all finite.</param>
    /// <remarks>The plateau is the smallest level whose estimate is not exceeded, beyond its error, by any coarser level
    /// with at least <see cref="MinimumBlocksForPlateau"/> blocks; that is where the estimate has stopped rising.</remarks>
    public static BlockingEstimate Estimate(ReadOnlySpan<double> series)
    {
        if (series.Length < 4)
        {
            throw new ArgumentException(string.Create(CultureInfo.InvariantCulture, $"series has {series.Length} values; blocking needs at least 4."), nameof(series));
        }
        var work = new double[series.Length];
        for (int i = 0; i < series.Length; i++)
        {
            work[i] = Preconditions.CheckFinite(series[i], "series");
        }
        var levels = ImmutableArray.CreateBuilder<BlockingLevel>();
        int n = work.Length;
        long blockSize = 1;
        while (n >= 2)
        {
            double mean = 0;
            for (int i = 0; i < n; i++)
            {
                mean += work[i];
            }
            mean /= n;
            double c0 = 0;
            for (int i = 0; i < n; i++)
            {
                double d = work[i] - mean;
                c0 += d * d;
            }
            c0 /= n;
            double se = Math.Sqrt(c0 / (n - 1));
            levels.Add(new BlockingLevel(blockSize, n, se, se / Math.Sqrt(2.0 * (n - 1))));
            int half = n / 2;
            for (int i = 0; i < half; i++)
            {
                work[i] = 0.5 * (work[2 * i] + work[2 * i + 1]);
            }
            n = half;
            blockSize *= 2;
        }
        var all = levels.ToImmutable();
        int usable = 0;
        while (usable < all.Length && all[usable].BlockCount >= MinimumBlocksForPlateau)
        {
            usable++;
        }
        for (int k = 0; k < usable; k++)
        {
            bool plateau = true;
            for (int j = k + 1; j < usable; j++)
            {
                if (all[j].StandardError - all[j].StandardErrorUncertainty > all[k].StandardError + all[k].StandardErrorUncertainty)
                {
                    plateau = false;
                    break;
                }
            }
            if (plateau && k < usable - 1)
            {
                return new BlockingEstimate(all, k, true, "");
            }
        }
        int chosen = Math.Max(0, usable - 1);
        return new BlockingEstimate(all, chosen, false,
            "The blocking estimate was still rising at the coarsest level with enough blocks: the series is too short for its correlation time, so the error bar is a lower bound. Run longer.");
    }
}
