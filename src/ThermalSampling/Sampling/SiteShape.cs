using System;
using System.Collections.Generic;
using System.Globalization;
using System.Linq;
using ThermalSampling.Analysis;
using ThermalSampling.Landscapes;
using ThermalSampling.Persistence;

namespace ThermalSampling.Sampling;

/// <summary>
/// Where a site's distribution histograms are taken, fixed before sampling so that every chain, lane width and shard bins
/// alike: the centre c (the minimum plus the first-order mean shift: the predicted mean), the principal axes of the
/// harmonic covariance (largest variance first; within a degenerate set, the projections of x, y, z in turn, made
/// orthonormal, so that a cubic site is binned along its cube axes), the half-width of each marginal (by default six
/// harmonic standard deviations, <see cref="SamplingSettings.SiteDistributionHalfWidthInSigmas"/>; no wider than the
/// confinement allows), the radial range, the marginal bin count and the side of
/// the square projection on the plane of the two largest axes (a power of two).
/// </summary>
/// <remarks>
/// Slots per chain: for each axis k, [below, N bins, above]; then the radial distance |x − c| in N bins and beyond; then
/// the projection's side² cells (first-axis index major) and one slot for outside it.
/// </remarks>
internal sealed record ShapeFrame(Position Centre, Position[] Axes, double[] HalfWidths, double RadialUpper, int Bins, int Side)
{
    /// <summary>
    /// Metropolis chains count every LaneStride-th recorded draw in the distribution histograms (direct draws, being
    /// independent, are all counted). Consecutive Metropolis draws are correlated over several steps, so little is lost,
    /// while the five scattered increments per draw would cost a site step about half again (measured: docs/performance.md).
    /// The densities' standard errors use the smaller of the effective sample size and the draws counted.
    /// </summary>
    internal const int LaneStride = 4;

    /// <summary>Relative difference below which two harmonic variances count as one degenerate set.</summary>
    private const double Degenerate = 1e-6;

    /// <summary>The first slot of marginal k.</summary>
    internal int MarginalBase(int k) => k * (Bins + 2);

    /// <summary>The first slot of the radial histogram.</summary>
    internal int RadialBase => 3 * (Bins + 2);

    /// <summary>The first slot of the projection.</summary>
    internal int ProjectionBase => RadialBase + Bins + 1;

    /// <summary>log₂ of <see cref="Side"/>.</summary>
    internal int SideShift => System.Numerics.BitOperations.Log2((uint)Side);

    /// <summary>Slots per chain.</summary>
    internal int Slots => ProjectionBase + Side * Side + 1;

    /// <summary>The frame for a site: its harmonic estimate, confinement, and <paramref name="bins"/> marginal bins.</summary>
    internal static ShapeFrame For(SiteHarmonicEstimate harmonic, Confinement confinement, Position confinementCentre, int bins, double halfWidthInSigmas)
    {
        var centre = harmonic.Minimum + harmonic.FirstOrderMeanShift;
        if (!(confinement.DistanceToWall(centre.X - confinementCentre.X, centre.Y - confinementCentre.Y, centre.Z - confinementCentre.Z) > 0))
        {
            centre = harmonic.Minimum; // a first-order shift past the wall means nothing: bin about the minimum
        }
        var modes = harmonic.Modes.OrderByDescending(m => m.ClassicalVarianceInAngstromsSquared).ToArray();
        var axes = new Position[3];
        var cartesian = new[] { new Position(1, 0, 0), new Position(0, 1, 0), new Position(0, 0, 1) };
        for (int start = 0; start < 3;)
        {
            int end = start + 1;
            while (end < 3 && Math.Abs(modes[end].ClassicalVarianceInAngstromsSquared - modes[start].ClassicalVarianceInAngstromsSquared)
                <= Degenerate * modes[start].ClassicalVarianceInAngstromsSquared)
            {
                end++;
            }
            if (end - start == 1)
            {
                axes[start] = Oriented(modes[start].Direction);
            }
            else
            {
                // A degenerate set: project x, y, z onto its span and orthonormalise, in that order, keeping the first end − start.
                int found = start;
                foreach (var e in cartesian)
                {
                    var v = new Position(0, 0, 0);
                    for (int m = start; m < end; m++)
                    {
                        v += Dot(e, modes[m].Direction) * modes[m].Direction;
                    }
                    for (int a = start; a < found; a++)
                    {
                        v -= Dot(v, axes[a]) * axes[a];
                    }
                    if (v.Norm > 1e-3 && found < end)
                    {
                        axes[found++] = Oriented((1 / v.Norm) * v);
                    }
                }
            }
            start = end;
        }
        double size = confinement.SizeInAngstroms;
        double reach = (confinement.Shape == ConfinementShape.Sphere ? size : size * Math.Sqrt(3)) + (centre - confinementCentre).Norm;
        var halfWidths = modes.Select(m => Math.Min(halfWidthInSigmas * Math.Sqrt(m.ClassicalVarianceInAngstromsSquared), reach)).ToArray();
        double radial = Math.Min(halfWidthInSigmas * Math.Sqrt(modes[0].ClassicalVarianceInAngstromsSquared), reach);
        return new ShapeFrame(centre, axes, halfWidths, radial, bins, SideFor(bins));
    }

    /// <summary>The projection's side: the power of two nearest half the marginal bins, 4 to 256.</summary>
    internal static int SideFor(int bins) => 1 << Math.Clamp((int)Math.Round(Math.Log2(bins / 2.0)), 2, 8);

    private static double Dot(Position a, Position b) => a.X * b.X + a.Y * b.Y + a.Z * b.Z;

    /// <summary>The unit vector with its largest component (the first of equals) positive.</summary>
    private static Position Oriented(Position v)
    {
        double[] c = [v.X, v.Y, v.Z];
        int k = 0;
        for (int i = 1; i < 3; i++)
        {
            if (Math.Abs(c[i]) > Math.Abs(c[k]) + 1e-12)
            {
                k = i;
            }
        }
        return c[k] < 0 ? -1 * v : v;
    }

    /// <summary>The frame's numbers in a fixed order (centre, axes row by row, half-widths, radial range, bins, side).</summary>
    internal double[] ToValues()
    {
        var v = new List<double> { Centre.X, Centre.Y, Centre.Z };
        foreach (var a in Axes)
        {
            v.AddRange([a.X, a.Y, a.Z]);
        }
        v.AddRange(HalfWidths);
        v.AddRange([RadialUpper, Bins, Side]);
        return [.. v];
    }

    /// <summary>The number of values <see cref="ToValues"/> gives.</summary>
    internal const int ValueCount = 18;

    /// <summary>Rebuilds a frame from <see cref="ToValues"/>, refusing values no frame has.</summary>
    internal static ShapeFrame FromValues(double[] v)
    {
        var axes = new[] { new Position(v[3], v[4], v[5]), new Position(v[6], v[7], v[8]), new Position(v[9], v[10], v[11]) };
        double[] halfWidths = [v[12], v[13], v[14]];
        int bins = (int)v[16], side = (int)v[17];
        if (!v.All(double.IsFinite) || axes.Any(a => Math.Abs(a.Norm - 1) > 1e-9) || halfWidths.Any(h => !(h > 0)) || !(v[15] > 0)
            || bins != v[16] || bins < 4 || bins > 10_000 || side != SideFor(bins))
        {
            throw new CheckpointException("The record's distribution frame is not one this library writes.");
        }
        return new ShapeFrame(new Position(v[0], v[1], v[2]), axes, halfWidths, v[15], bins, side);
    }

    /// <summary>Whether <paramref name="other"/> is the same frame, value for value.</summary>
    internal bool SameAs(ShapeFrame other) => ToValues().AsSpan().SequenceEqual(other.ToValues());

    /// <summary>The slots of one draw at (x, y, z): three marginals, the radial distance, the projection (the lane kernels' arithmetic, one lane).</summary>
    internal void Slots3(double x, double y, double z, Span<int> slots)
    {
        double dx = x - Centre.X, dy = y - Centre.Y, dz = z - Centre.Z;
        Span<double> a = stackalloc double[3];
        for (int k = 0; k < 3; k++)
        {
            a[k] = Axes[k].X * dx + Axes[k].Y * dy + Axes[k].Z * dz;
            double t = Math.Clamp((a[k] + HalfWidths[k]) * (Bins / (2 * HalfWidths[k])) + 1, 0, Bins + 1);
            slots[k] = MarginalBase(k) + (int)t;
        }
        double r = Math.Sqrt(dx * dx + dy * dy + dz * dz);
        slots[3] = RadialBase + (int)Math.Min(r * (Bins / RadialUpper), Bins);
        double i = (a[0] + HalfWidths[0]) * (Side / (2 * HalfWidths[0])), j = (a[1] + HalfWidths[1]) * (Side / (2 * HalfWidths[1]));
        bool inside = i >= 0 && i < Side && j >= 0 && j < Side;
        slots[4] = ProjectionBase + (inside ? ((int)i << SideShift) + (int)j : Side * Side);
    }
}

/// <summary>One site chain's distribution counts in its <see cref="ShapeFrame"/>'s slots.</summary>
internal sealed class ShapeCounter(ShapeFrame frame)
{
    internal ShapeFrame Frame { get; } = frame;

    internal long[] Counts { get; } = new long[frame.Slots];

    /// <summary>Counts one draw (the direct samplers' path).</summary>
    internal void Add(double x, double y, double z)
    {
        Span<int> slots = stackalloc int[5];
        Frame.Slots3(x, y, z, slots);
        foreach (int s in slots)
        {
            Counts[s]++;
        }
    }

    /// <summary>Adds counts gathered elsewhere (one per slot).</summary>
    internal void AddCounts(ReadOnlySpan<long> counts)
    {
        for (int i = 0; i < Counts.Length; i++)
        {
            Counts[i] += counts[i];
        }
    }

    internal void Save(StateWriter w) => w.Longs("SHPC", Counts);

    internal void Load(StateReader r) => r.Longs("SHPC", Counts.Length).CopyTo(Counts, 0);
}
