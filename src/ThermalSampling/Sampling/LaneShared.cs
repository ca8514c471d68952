using System;
using System.Runtime.CompilerServices;
using ThermalSampling.Statistics;
using ThermalSampling.Persistence;
using ThermalSampling.Numerics;
using ThermalSampling.Potentials;
using ThermalSampling.Landscapes;

namespace ThermalSampling.Sampling;

// Stryker disable all : vector-lane kernel, in no mutation mode (eng/mutation-testing.sh); LaneKernelTests checks it bit for bit
/// <summary>Where and what the last non-finite energy of a chunk was, per lane.</summary>
/// <typeparam name="TD">The lane type.</typeparam>
[System.Runtime.InteropServices.StructLayout(System.Runtime.InteropServices.LayoutKind.Sequential)]
internal struct LaneFaults<TD> where TD : struct
{
    internal TD AllFinite, Separation, Energy;
}

// Stryker disable all : vector-lane kernel, in no mutation mode (eng/mutation-testing.sh); LaneKernelTests checks it bit for bit
/// <summary>
/// Fault bookkeeping shared by the lane kernels: −∞ and NaN energies are noted in a mask (+∞, a hard core, is an ordinary
/// rejection) and thrown after each chunk, so no call sits in an inner loop (a call there would force every vector
/// register to be spilled, since all are caller-saved); a faulty chunk is never turned into a result.
/// </summary>
internal static class LaneFaultCheck
{
    internal static LaneFaults<TD> None<TOps, TD, TB>()
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
        => new() { AllFinite = TOps.LessOrEqual(TOps.Broadcast(0.0), TOps.Broadcast(0.0)) };

    /// <summary>Notes lanes whose energy <paramref name="e"/> is −∞ or NaN, with <paramref name="where"/> (a separation or distance from the centre).</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal static void Note<TOps, TD, TB>(ref LaneFaults<TD> faults, TD where, TD e)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
    {
        var ok = TOps.GreaterThan(e, TOps.Broadcast(double.NegativeInfinity));
        faults.AllFinite = TOps.And(faults.AllFinite, ok);
        faults.Separation = TOps.Select(ok, faults.Separation, where);
        faults.Energy = TOps.Select(ok, faults.Energy, e);
    }

    /// <summary>
    /// Throws for the first faulted lane, naming what <paramref name="describe"/> says of <paramref name="source"/> (a potential
    /// or a bead field); the description is built only then (formatting it costs more than a chunk of a ladder's steps).
    /// </summary>
    internal static void ThrowIfAny<TOps, TD, TB, TSource>(in LaneFaults<TD> faults, in TSource source, Func<TSource, string> describe)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
    {
        if (TOps.AllTrue(faults.AllFinite))
        {
            return;
        }
        int lane = FirstFaultedLane<TOps, TD, TB>(faults);
        throw new NonFiniteEnergyException(TOps.Get(faults.Separation, lane), TOps.Get(faults.Energy, lane), describe(source));
    }

    /// <summary>The first lane whose noted energy is −∞ or NaN (the last lane when none is).</summary>
    internal static int FirstFaultedLane<TOps, TD, TB>(in LaneFaults<TD> faults)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
    {
        int lane = 0;
        while (lane < TOps.Count - 1 && TOps.Get(faults.Energy, lane) > double.NegativeInfinity)
        {
            lane++;
        }
        return lane;
    }
}

// Stryker disable all : vector-lane kernel, in no mutation mode (eng/mutation-testing.sh); LaneKernelTests checks it bit for bit
/// <summary>
/// Tunes each lane's Metropolis proposal width during burn-in by a Robbins–Monro update of its logarithm,
/// log w ← min(log w + (accepted − target)·2/(t + 10)^0.6, log w_max), and is never used after burn-in, so the recorded
/// chain is a time-homogeneous Markov chain with a frozen width.
/// </summary>
internal static class LaneAdaptation
{
    /// <summary>Steps between cancellation checks and progress reports in every lane kernel.</summary>
    internal const int ChunkSteps = 4096;

    /// <summary>The adapter's gains 2/(t + 10)^0.6 for steps t = first + 1 … first + count (computed outside the inner loop: Math.Pow is a call).</summary>
    internal static void FillGains(double[] gains, long first, int count)
    {
        for (int j = 0; j < count; j++)
        {
            gains[j] = 2.0 / Math.Pow(first + j + 1 + 10, 0.6);
        }
    }

    /// <summary>log w ← min(log w + (a − target)·gain, log w_max), in every lane.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal static TD Update<TOps, TD, TB>(TD logWidth, TD accept, double target, double gain, TD logMax)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
    {
        var hit = TOps.Select(accept, TOps.Broadcast(1.0), TOps.Broadcast(0.0));
        logWidth = TOps.Add(logWidth, TOps.Multiply(TOps.Subtract(hit, TOps.Broadcast(target)), TOps.Broadcast(gain)));
        return TOps.Select(TOps.LessThan(logWidth, logMax), logWidth, logMax);
    }

    /// <summary>min(e^(log w), w_max) in every lane.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal static TD Width<TOps, TD, TB>(TD logWidth, double maxWidth)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
    {
        var w = LaneMath.Exp<TOps, TD, TB>(logWidth);
        var max = TOps.Broadcast(maxWidth);
        return TOps.Select(TOps.LessThan(w, max), w, max);
    }
}

// Stryker disable all : vector-lane kernel, in no mutation mode (eng/mutation-testing.sh); LaneKernelTests checks it bit for bit
/// <summary>
/// The flat arrays a lane group's inner loop writes without calls: lane-major histogram counts, flat-index scratch,
/// retained draws, the sums of the batches closed in a chunk, and scratch for one vector's lanes.
/// </summary>
internal class LaneTally
{
    /// <param name="records">The live lanes' chain records (their histogram's bins and scale, retained-draw cap, batch size and energy histograms).</param>
    /// <param name="width">Lanes per vector.</param>
    /// <param name="batchValues">Sums kept per closed batch (2 per coordinate, and 2 for the energy).</param>
    internal LaneTally(ChainRecord[] records, int width, int batchValues)
    {
        var first = records[0];
        var layout = first.Layout;
        int lanes = records.Length, coordinates = layout.Coordinates, retained = (int)Math.Min(layout.Samples, layout.Retained);
        EnergyReference = first.EnergyReferenceInElectronVolts;
        EnergyCounts = new long[lanes * EnergyHistogram.Slots];
        EnergyScales = new double[width];
        for (int lane = 0; lane < width; lane++)
        {
            EnergyScales[lane] = 1 / records[Math.Min(lane, lanes - 1)].EnergyHistogram.BinWidthInElectronVolts;
        }
        BinScale = first.Bins.Scale;
        Bins = first.Bins.Counts.Length;
        Lanes = lanes;
        Retained = retained;
        Counts = new long[lanes * Bins];
        Index = new ulong[width];
        Scratch = new double[coordinates * width];
        RwValues = coordinates == 1 ? 2 : 9;
        RwCounts = new long[lanes * EnergyBinSums.Groups * EnergyBinSums.Slots];
        RwSums = new double[lanes * EnergyBinSums.Groups * EnergyBinSums.Slots * RwValues];
        Samples = layout.Samples;
        RwScratch = new double[(coordinates + 1) * width];
        RwScales = new double[width];
        for (int lane = 0; lane < width; lane++)
        {
            RwScales[lane] = 1 / records[Math.Min(lane, lanes - 1)].Reweighting.Width;
        }
        Kept = new double[(long)coordinates * lanes * retained];
        // Between two 4096-step boundaries (where the engine hands them to the records) at most 4096/batchSize + 1 batches close.
        BatchSums = new double[batchValues * width * (LaneAdaptation.ChunkSteps / first.Stores[0].BatchSize + 1)];
        Coordinates = coordinates;
    }

    /// <summary>The reference the energy's sums and histogram are taken about (V_ref of the records).</summary>
    internal double EnergyReference { get; }

    /// <summary>Moves every lane's histogram and energy counts into the records, and the draws kept in the first <paramref name="samples"/> recorded steps.</summary>
    internal void CopyTo(ChainRecord[] records, long samples)
    {
        long kept = Math.Min(samples, Retained);
        for (int lane = 0; lane < Lanes; lane++)
        {
            records[lane].Bins.AddCounts(Counts.AsSpan(lane * Bins, Bins));
            records[lane].EnergyHistogram.AddCounts(EnergyCounts.AsSpan(lane * EnergyHistogram.Slots, EnergyHistogram.Slots));
            int block = EnergyBinSums.Groups * EnergyBinSums.Slots;
            if (RwCounts.Length > 0)
            {
                records[lane].Reweighting.AddAll(RwCounts.AsSpan(lane * block, block), RwSums.AsSpan(lane * block * RwValues, block * RwValues));
            }
            for (long k = 0; k < kept; k++)
            {
                long row = Coordinates * (lane * (long)Retained + k);
                if (Coordinates == 1)
                {
                    records[lane].KeptSeparations.Add(Kept[row]);
                }
                else
                {
                    records[lane].KeptPositions.Add(new Position(Kept[row], Kept[row + 1], Kept[row + 2]));
                }
            }
        }
    }

    internal int Coordinates { get; }

    /// <summary>Writes the counts and, per lane, the draws kept in the first <paramref name="recorded"/> recorded steps.</summary>
    internal void Save(StateWriter w, long recorded)
    {
        w.Longs("LCNT", Counts);
        w.Longs("LECN", EnergyCounts);
        w.Longs("LRWC", RwCounts);
        w.Doubles("LRWS", RwSums);
        long kept = Coordinates * Math.Min(recorded, Retained);
        for (int lane = 0; lane < Lanes; lane++)
        {
            w.Doubles("LKEP", Kept.AsSpan((int)(lane * Coordinates * (long)Retained), (int)kept));
        }
    }

    /// <summary>Restores what <see cref="Save"/> wrote.</summary>
    internal void Load(StateReader r, long recorded)
    {
        r.Longs("LCNT", Counts.Length).CopyTo(Counts, 0);
        r.Longs("LECN", EnergyCounts.Length).CopyTo(EnergyCounts, 0);
        r.Longs("LRWC", RwCounts.Length).CopyTo(RwCounts, 0);
        r.DoublesInto("LRWS", RwSums);
        long kept = Coordinates * Math.Min(recorded, Retained);
        for (int lane = 0; lane < Lanes; lane++)
        {
            r.DoublesInto("LKEP", Kept.AsSpan((int)(lane * Coordinates * (long)Retained), (int)kept));
        }
    }

    internal double BinScale { get; }

    internal int Bins { get; }

    internal int Lanes { get; }

    internal int Retained { get; }

    /// <summary>Lane-major bin counts.</summary>
    internal long[] Counts { get; }

    /// <summary>Lane-major energy histogram counts (<see cref="EnergyHistogram.Slots"/> per lane).</summary>
    internal long[] EnergyCounts { get; }

    /// <summary>1 / bin width of each lane's energy histogram, 1/eV.</summary>
    internal double[] EnergyScales { get; }

    /// <summary>Recorded draws per chain.</summary>
    internal long Samples { get; }

    /// <summary>Values summed per fine energy bin for reweighting: 2 (pair) or 9 (site).</summary>
    internal int RwValues { get; }

    /// <summary>Lane-major fine energy counts for reweighting (<see cref="EnergyBinSums"/>).</summary>
    internal long[] RwCounts { get; private set; }

    /// <summary>Lane-major per-bin sums for reweighting.</summary>
    internal double[] RwSums { get; private set; }

    /// <summary>
    /// Records no sums for reweighting across temperatures (a ladder's rungs: nothing reweights them, and every rung's
    /// fine energy bins live at once outgrow the cache). Called before the group is opened; its checkpoints then hold
    /// empty sections, and its records' reweighting sums stay empty.
    /// </summary>
    internal void SkipReweighting() => (RwCounts, RwSums) = ([], []);

    /// <summary>Scratch for one vector's fine slots and values.</summary>
    internal double[] RwScratch { get; }

    /// <summary>1 / fine bin width of each lane, 1/eV.</summary>
    internal double[] RwScales { get; }

    /// <summary>Scratch for one vector's flat histogram indices.</summary>
    internal ulong[] Index { get; }

    /// <summary>Scratch for one vector's lanes (per coordinate).</summary>
    internal double[] Scratch { get; }

    /// <summary>Lane-major retained draws (the first <see cref="Retained"/> of each chain, coordinates interleaved).</summary>
    internal double[] Kept { get; }

    /// <summary>Sums of deviation and squared deviation per coordinate of the batches closed in a chunk: batch k, value v at (2·coordinates·k + v)·width.</summary>
    internal double[] BatchSums { get; }
}

// Stryker disable all : vector-lane kernel, in no mutation mode (eng/mutation-testing.sh); LaneKernelTests checks it bit for bit
/// <summary>
/// What every recorder writes besides its sums, for one chunk: the histogram and energy-histogram counts and the kept
/// draws, with the loop invariants broadcast once. A field of each recorder; its methods inline into the chunk loop.
/// </summary>
/// <typeparam name="TOps">The lane width.</typeparam>
/// <typeparam name="TD">Doubles, one per lane.</typeparam>
/// <typeparam name="TB">Raw words, one per lane.</typeparam>
internal readonly struct LaneTallyView<TOps, TD, TB>
    where TOps : struct, ILaneOps<TD, TB>
    where TD : struct
    where TB : struct
{
    private readonly TD _binScale, _binCount, _lastBin, _energyScale, _rwScale;
    private readonly TB _binOffsets, _energyOffsets;
    private readonly long[] _counts, _energyCounts, _rwCounts;
    private readonly ulong[] _index;
    private readonly double[] _scratch, _kept, _rwSums, _rwScratch;
    private readonly long _keptStride, _done, _retain, _samples, _nextGroupStart;
    private readonly int _group;
    private readonly bool _reweight;

    /// <param name="tally">The group's tally.</param>
    /// <param name="done">Recorded steps before the chunk.</param>
    /// <param name="chunk">The chunk's steps.</param>
    internal LaneTallyView(LaneTally tally, long done, int chunk)
    {
        EnergyReference = TOps.Broadcast(tally.EnergyReference);
        _binScale = TOps.Broadcast(tally.BinScale);
        _binCount = TOps.Broadcast(tally.Bins);
        _lastBin = TOps.Broadcast(tally.Bins - 1);
        Lanes = tally.Lanes;
        _binOffsets = LaneCounting.Offsets<TOps, TD, TB>(tally.Bins, Lanes);
        _energyOffsets = LaneCounting.Offsets<TOps, TD, TB>(EnergyHistogram.Slots, Lanes);
        _energyScale = TOps.Broadcast(0.0);
        _rwScale = TOps.Broadcast(0.0);
        for (int lane = 0; lane < TOps.Count; lane++)
        {
            _energyScale = TOps.Set(_energyScale, lane, tally.EnergyScales[lane]);
            _rwScale = TOps.Set(_rwScale, lane, tally.RwScales[lane]);
        }
        (_rwCounts, _rwSums, _rwScratch, _samples) = (tally.RwCounts, tally.RwSums, tally.RwScratch, tally.Samples);
        _reweight = tally.RwCounts.Length > 0;
        (_counts, _energyCounts, _index, _scratch, _kept) = (tally.Counts, tally.EnergyCounts, tally.Index, tally.Scratch, tally.Kept);
        BatchSums = tally.BatchSums;
        _keptStride = tally.Retained;
        (_group, _nextGroupStart, _done, _retain) = Place(done, chunk, _samples, _keptStride);
    }

    /// <summary>
    /// The view of <paramref name="template"/>'s tally for another chunk: the loop invariants copied, not broadcast again
    /// (a ladder cuts its chunks at every swap, where building them anew was a tenth of a short chunk's cost).
    /// </summary>
    /// <param name="template">A view of the same tally.</param>
    /// <param name="done">Recorded steps before the chunk.</param>
    /// <param name="chunk">The chunk's steps.</param>
    internal LaneTallyView(in LaneTallyView<TOps, TD, TB> template, long done, int chunk)
    {
        this = template;
        (_group, _nextGroupStart, _done, _retain) = Place(done, chunk, _samples, _keptStride);
    }

    /// <summary>
    /// Where a chunk stands: the reweighting group of its first draw and where the next begins (⌈(g + 1)N/G⌉: within a
    /// chunk the group is then a comparison, not a division per counted draw), its first step, and how many of its steps
    /// are kept raw (the first steps of each chain are).
    /// </summary>
    private static (int Group, long NextGroupStart, long Done, long Retain) Place(long done, int chunk, long samples, long retained)
    {
        int group = EnergyBinSums.GroupOf(done, samples);
        return (group, ((group + 1) * samples + EnergyBinSums.Groups - 1) / EnergyBinSums.Groups, done, Math.Max(0, Math.Min(chunk, retained - done)));
    }

    /// <summary>V_ref in every lane.</summary>
    internal TD EnergyReference { get; }

    /// <summary>Live lanes.</summary>
    internal int Lanes { get; }

    /// <summary>Where closed batches leave their sums.</summary>
    internal double[] BatchSums { get; }

    /// <summary>Scratch for one vector's flat indices (free between the counting calls).</summary>
    internal ulong[] Index => _index;

    /// <summary>Counts bin ⌊t·scale⌋ of the histogram, t ≥ 0 the value above the histogram's lower edge (at or past the upper edge: the last bin).</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal void CountBin(TD aboveLower)
    {
        var t = TOps.Multiply(aboveLower, _binScale);
        t = TOps.Select(TOps.LessThan(t, _binCount), t, _lastBin);
        LaneCounting.Count<TOps, TD, TB>(t, _binOffsets, _index, _counts, Lanes);
    }

    /// <summary>Counts the energy histogram's slot of <paramref name="de"/> = V − V_ref.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal void CountEnergy(TD de)
        => LaneCounting.Count<TOps, TD, TB>(LaneCounting.EnergySlot<TOps, TD, TB>(de, _energyScale), _energyOffsets, _index, _energyCounts, Lanes);

    /// <summary>
    /// Every fourth recorded draw (<see cref="EnergyBinSums"/>): its fine energy slot of <paramref name="de"/> = V − V_ref,
    /// counted with the pair's values b and b² (b = x − ref). The slot and values leave the vector once; the adds are per lane.
    /// </summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal void ReweightLine(int j, TD de, TD b)
    {
        if (((_done + j) & (EnergyBinSums.Stride - 1)) != 0 || !_reweight)
        {
            return;
        }
        var scratch = _rwScratch;
        TOps.Store(FineSlot(de), ref scratch[0]);
        TOps.Store(b, ref scratch[TOps.Count]);
        int group = Group(_done + j);
        for (int lane = 0; lane < Lanes; lane++)
        {
            int slot = (lane * EnergyBinSums.Groups + group) * EnergyBinSums.Slots + (int)scratch[lane];
            double v = scratch[TOps.Count + lane];
            _rwCounts[slot]++;
            _rwSums[2 * slot] += v;
            _rwSums[2 * slot + 1] += v * v;
        }
    }

    /// <summary>As <see cref="ReweightLine"/> for a site: the displacement (u_x, u_y, u_z) from the minimum and its six products.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal void ReweightSite(int j, TD de, TD ux, TD uy, TD uz)
    {
        if (((_done + j) & (EnergyBinSums.Stride - 1)) != 0 || !_reweight)
        {
            return;
        }
        var scratch = _rwScratch;
        int n = TOps.Count;
        TOps.Store(FineSlot(de), ref scratch[0]);
        TOps.Store(ux, ref scratch[n]);
        TOps.Store(uy, ref scratch[2 * n]);
        TOps.Store(uz, ref scratch[3 * n]);
        int group = Group(_done + j);
        for (int lane = 0; lane < Lanes; lane++)
        {
            int slot = (lane * EnergyBinSums.Groups + group) * EnergyBinSums.Slots + (int)scratch[lane];
            int at = 9 * slot;
            double x = scratch[n + lane], y = scratch[2 * n + lane], z = scratch[3 * n + lane];
            _rwCounts[slot]++;
            var sums = _rwSums;
            sums[at] += x;
            sums[at + 1] += y;
            sums[at + 2] += z;
            sums[at + 3] += x * x;
            sums[at + 4] += y * y;
            sums[at + 5] += z * z;
            sums[at + 6] += x * y;
            sums[at + 7] += x * z;
            sums[at + 8] += y * z;
        }
    }

    /// <summary>The group of consecutive draws (<see cref="EnergyBinSums.Groups"/> per chain) of the chunk's draw <paramref name="j"/>.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal int GroupAt(int j) => Group(_done + j);

    /// <summary>Scratch for one vector's lanes per coordinate (free between the calls that use it).</summary>
    internal double[] Scratch => _scratch;

    /// <summary>The reweighting group of recorded draw <paramref name="index"/> (a division only past the chunk's first group boundary).</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private int Group(long index) => index < _nextGroupStart ? _group : EnergyBinSums.GroupOf(index, _samples);

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private TD FineSlot(TD de)
    {
        var t = TOps.MultiplyAdd(de, _rwScale, TOps.Broadcast(1.0));
        t = TOps.Select(TOps.LessThan(t, TOps.Broadcast(1.0)), TOps.Broadcast(0.0), t);
        var last = TOps.Broadcast(EnergyBinSums.Slots - 1);
        return TOps.Select(TOps.LessThan(t, last), t, last);
    }

    /// <summary>Keeps draw <paramref name="j"/> of the chunk (x, and y and z for three coordinates) if it is among each chain's first kept draws.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal void Keep(int j, int coordinates, TD x, TD y, TD z)
    {
        if (j >= _retain)
        {
            return;
        }
        var scratch = _scratch;
        var kept = _kept;
        long at = _done + j;
        TOps.Store(x, ref scratch[0]);
        if (coordinates == 1)
        {
            for (int lane = 0; lane < Lanes; lane++)
            {
                kept[lane * _keptStride + at] = scratch[lane];
            }
            return;
        }
        TOps.Store(y, ref scratch[TOps.Count]);
        TOps.Store(z, ref scratch[2 * TOps.Count]);
        for (int lane = 0; lane < Lanes; lane++)
        {
            long row = 3 * (lane * _keptStride + at);
            kept[row] = scratch[lane];
            kept[row + 1] = scratch[TOps.Count + lane];
            kept[row + 2] = scratch[2 * TOps.Count + lane];
        }
    }
}

// Stryker disable all : vector-lane kernel, in no mutation mode (eng/mutation-testing.sh); LaneKernelTests checks it bit for bit
/// <summary>Histogram counting inside the chunk loops, shared by every recorder.</summary>
internal static class LaneCounting
{
    /// <summary>Lane offsets lane·slots into lane-major counts (padding lanes repeat the last live lane and are never counted).</summary>
    internal static TB Offsets<TOps, TD, TB>(int slots, int lanes)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
    {
        var offsets = TOps.BroadcastBits(0);
        for (int lane = 0; lane < TOps.Count; lane++)
        {
            offsets = TOps.SetBits(offsets, lane, (ulong)(Math.Min(lane, lanes - 1) * slots));
        }
        return offsets;
    }

    /// <summary>
    /// Counts slot ⌊t⌋ of each live lane, t already within [0, slots): the flat index lane·slots + ⌊t⌋ is formed in the
    /// vector; only the increments are per lane.
    /// </summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal static void Count<TOps, TD, TB>(TD t, TB offsets, ulong[] index, long[] counts, int lanes)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
    {
        TOps.StoreBits(TOps.AddBits(TOps.Truncate(t), offsets), ref index[0]);
        for (int lane = 0; lane < lanes; lane++)
        {
            counts[index[lane]]++;
        }
    }

    /// <summary>Counts the flat slot index (already offset per lane) of each live lane.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal static void CountSlots<TOps, TD, TB>(TB slots, ulong[] index, long[] counts, int lanes)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
    {
        TOps.StoreBits(slots, ref index[0]);
        for (int lane = 0; lane < lanes; lane++)
        {
            counts[index[lane]]++;
        }
    }

    /// <summary>
    /// The energy histogram's slot of V − V_ref in every lane: 0 below the reference, 1 + ⌊(V − V_ref)/w⌋ for the
    /// <see cref="EnergyHistogram.Bins"/> bins, and the last slot at or beyond their end.
    /// </summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal static TD EnergySlot<TOps, TD, TB>(TD de, TD scale)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
    {
        var t = TOps.MultiplyAdd(de, scale, TOps.Broadcast(1.0));
        t = TOps.Select(TOps.LessThan(t, TOps.Broadcast(1.0)), TOps.Broadcast(0.0), t);
        var last = TOps.Broadcast(EnergyHistogram.Slots - 1);
        return TOps.Select(TOps.LessThan(t, last), t, last);
    }
}

// Stryker disable all : vector-lane kernel, in no mutation mode (eng/mutation-testing.sh); LaneKernelTests checks it bit for bit
/// <summary>
/// The open moment block's Σ cos(q·u) and Σ sin(q·u) per scattering vector q in every lane (u the displacement from the
/// record's reference), and the vectors broadcast: what the records' temperature-factor sums are built from. With no
/// vector it holds nothing and <see cref="Add1"/>/<see cref="Add3"/> return at once.
/// </summary>
internal sealed class LaneWaves<TOps, TD, TB>
    where TOps : struct, ILaneOps<TD, TB>
    where TD : struct
    where TB : struct
{
    private readonly TD[] _q;
    private readonly TD[] _sums;

    internal LaneWaves(RecordLayout layout)
    {
        Count = layout.WaveCount;
        _q = new TD[layout.Waves.Length];
        for (int i = 0; i < _q.Length; i++)
        {
            _q[i] = TOps.Broadcast(layout.Waves[i]);
        }
        _sums = new TD[2 * Count];
    }

    /// <summary>The number of scattering vectors.</summary>
    internal int Count { get; }

    /// <summary>Adds cos(q·u) and sin(q·u) of a one-coordinate displacement for every q.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal void Add1(TD u)
    {
        var q = _q;
        var sums = _sums;
        for (int k = 0; k < q.Length; k++)
        {
            var sin = LaneMath.SinCos<TOps, TD, TB>(TOps.Multiply(q[k], u), out var cos);
            sums[2 * k] = TOps.Add(sums[2 * k], cos);
            sums[2 * k + 1] = TOps.Add(sums[2 * k + 1], sin);
        }
    }

    /// <summary>Adds cos(q·u) and sin(q·u) of a three-coordinate displacement for every q.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal void Add3(TD ux, TD uy, TD uz)
    {
        var q = _q;
        var sums = _sums;
        for (int k = 0; k < Count; k++)
        {
            var phase = TOps.MultiplyAdd(q[3 * k + 2], uz, TOps.MultiplyAdd(q[3 * k + 1], uy, TOps.Multiply(q[3 * k], ux)));
            var sin = LaneMath.SinCos<TOps, TD, TB>(phase, out var cos);
            sums[2 * k] = TOps.Add(sums[2 * k], cos);
            sums[2 * k + 1] = TOps.Add(sums[2 * k + 1], sin);
        }
    }

    /// <summary>Lane <paramref name="lane"/>'s sums (cos, sin per q) into <paramref name="into"/>.</summary>
    internal void CopyLane(int lane, Span<double> into)
    {
        for (int i = 0; i < _sums.Length; i++)
        {
            into[i] = TOps.Get(_sums[i], lane);
        }
    }

    /// <summary>Starts a new block.</summary>
    internal void Clear() => Array.Clear(_sums);

    /// <summary>Writes the open block's sums (lane by lane within each sum).</summary>
    internal void Save(StateWriter w)
    {
        var values = new double[_sums.Length * TOps.Count];
        for (int i = 0; i < _sums.Length; i++)
        {
            for (int lane = 0; lane < TOps.Count; lane++)
            {
                values[i * TOps.Count + lane] = TOps.Get(_sums[i], lane);
            }
        }
        w.Doubles("WAVS", values);
    }

    /// <summary>Reads what <see cref="Save"/> wrote.</summary>
    internal void Load(StateReader r)
    {
        var values = r.Doubles("WAVS", _sums.Length * TOps.Count);
        for (int i = 0; i < _sums.Length; i++)
        {
            for (int lane = 0; lane < TOps.Count; lane++)
            {
                _sums[i] = TOps.Set(_sums[i], lane, values[i * TOps.Count + lane]);
            }
        }
    }
}

// Stryker disable all : vector-lane kernel, in no mutation mode (eng/mutation-testing.sh); LaneKernelTests checks it bit for bit
/// <summary>Loads chains' streams into the lanes of the generator state.</summary>
internal static class LaneSeeding
{
    internal static void Load<TOps, TD, TB>(ref TB r0, ref TB r1, ref TB r2, ref TB r3, int lane, in Randomness.RandomStream stream)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
    {
        Span<ulong> words = stackalloc ulong[4];
        stream.GetState(words);
        r0 = TOps.SetBits(r0, lane, words[0]);
        r1 = TOps.SetBits(r1, lane, words[1]);
        r2 = TOps.SetBits(r2, lane, words[2]);
        r3 = TOps.SetBits(r3, lane, words[3]);
    }
}

