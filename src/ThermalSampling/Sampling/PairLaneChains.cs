using System;
using System.Runtime.CompilerServices;
using System.Runtime.Intrinsics;
using System.Threading;
using ThermalSampling.Potentials;
using ThermalSampling.Randomness;
using ThermalSampling.Statistics;

namespace ThermalSampling.Sampling;

/// <summary>
/// Random-walk Metropolis for line and radial pairs, several chains in lockstep (one per vector lane). Per step and lane:
/// r' = r + w(2u₁ − 1 + 2^−52) (uniform on a grid symmetric about 0, so the proposal is exactly symmetric); r' outside the window is rejected; otherwise accepted when
/// u₂·J(r) &lt; J(r')·e^(−(V(r') − V(r))/kT), with J = 1 (line) or r² (radial). During burn-in each lane's width follows
/// <see cref="LaneAdaptation"/>'s rule; then it freezes. Every chain uses its own stream
/// (<see cref="RandomStream.ForChain"/>), so the draws of chain c are the same bits at any lane width and thread count.
/// </summary>
internal static class PairLaneChains
{
    /// <summary>What one chain of a lane group hands back.</summary>
    internal sealed record ChainOutcome(PairChainRecord Record, long Accepted, double Width);

    private const int ChunkSteps = LaneAdaptation.ChunkSteps;

    /// <summary>Everything fixed for a run.</summary>
    internal sealed record Plan<TPotential>(TPotential Potential, double Lower, double Upper, double Beta, bool Radial, double InitialWidth,
        double TargetAcceptance, double MaxWidth, long BurnIn, long Samples, ulong Seed) where TPotential : struct, IPairPotential;

    /// <summary>The widest lane count worth using: a power of two no larger than the hardware's vector and no larger than the chains each thread gets.</summary>
    internal static int ChooseLanes(int chains, int threads, int? requested)
    {
        if (requested is int r)
        {
            return r;
        }
        int hardware = Vector512.IsHardwareAccelerated ? 8 : Vector256.IsHardwareAccelerated ? 4 : Vector128.IsHardwareAccelerated ? 2 : 1;
        int perThread = Math.Max(1, chains / Math.Max(1, threads));
        int lanes = 1;
        while (lanes * 2 <= Math.Min(hardware, perThread))
        {
            lanes *= 2;
        }
        return lanes;
    }

    /// <summary>Runs chains <paramref name="firstChain"/> … firstChain + lanes − 1 (those at or beyond the chain count are computed and dropped).</summary>
    internal static ChainOutcome[] Run<TPotential>(int lanes, Plan<TPotential> plan, int firstChain, int chains, Func<int, double> start,
        Func<int, PairChainRecord> record, Func<int, ProgressReporter> progress, CancellationToken ct)
        where TPotential : struct, IPairPotential
        => lanes switch
        {
            8 => Run<Lanes8, Vector512<double>, Vector512<ulong>, TPotential>(plan, firstChain, chains, start, record, progress, ct),
            4 => Run<Lanes4, Vector256<double>, Vector256<ulong>, TPotential>(plan, firstChain, chains, start, record, progress, ct),
            2 => Run<Lanes2, Vector128<double>, Vector128<ulong>, TPotential>(plan, firstChain, chains, start, record, progress, ct),
            _ => Run<Lanes1, double, ulong, TPotential>(plan, firstChain, chains, start, record, progress, ct),
        };

    private static ChainOutcome[] Run<TOps, TD, TB, TPotential>(Plan<TPotential> plan, int firstChain, int chains, Func<int, double> start,
        Func<int, PairChainRecord> makeRecord, Func<int, ProgressReporter> makeProgress, CancellationToken ct)
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
        where TPotential : struct, IPairPotential
    {
        int width = TOps.Count;
        int live = Math.Min(width, chains - firstChain);
        var records = new PairChainRecord[live];
        var reporters = new ProgressReporter[live];
        var walk = default(Walk<TD, TB>);
        var r = TOps.Broadcast(0);
        for (int lane = 0; lane < width; lane++)
        {
            int chain = Math.Min(firstChain + lane, chains - 1); // padding lanes repeat the last chain and are dropped
            LaneSeeding.Load<TOps, TD, TB>(ref walk.R0, ref walk.R1, ref walk.R2, ref walk.R3, lane, RandomStream.ForChain(plan.Seed, chain));
            r = TOps.Set(r, lane, start(chain));
            if (lane < live)
            {
                records[lane] = makeRecord(chain);
                reporters[lane] = makeProgress(chain);
            }
        }

        var kernel = new Kernel<TOps, TD, TB, TPotential>(plan);
        kernel.Start(ref walk, r);
        var logWidth = kernel.BurnIn(ref walk, TOps.Broadcast(Math.Log(plan.InitialWidth)), plan.BurnIn, reporters, ct);
        var stepWidth = kernel.WidthFrom(logWidth);
        kernel.Record(ref walk, stepWidth, plan.BurnIn, plan.Samples, records, reporters, ct);
        var accepted = walk.Accepted;

        var outcomes = new ChainOutcome[live];
        for (int lane = 0; lane < live; lane++)
        {
            reporters[lane].Finish();
            outcomes[lane] = new ChainOutcome(records[lane], (long)TOps.Get(accepted, lane), TOps.Get(stepWidth, lane));
        }
        return outcomes;
    }

    private readonly struct Kernel<TOps, TD, TB, TPotential>
        where TOps : struct, ILaneOps<TD, TB>
        where TD : struct
        where TB : struct
        where TPotential : struct, IPairPotential
    {
        private readonly TPotential _potential;
        private readonly double _lower, _upper, _beta, _target, _maxWidth;
        private readonly bool _radial;

        internal Kernel(Plan<TPotential> plan)
        {
            _potential = plan.Potential;
            _lower = plan.Lower;
            _upper = plan.Upper;
            _beta = plan.Beta;
            _radial = plan.Radial;
            _target = plan.TargetAcceptance;
            _maxWidth = plan.MaxWidth;
        }

        internal void Start(ref Walk<TD, TB> w, TD r)
        {
            var e = Energy(r);
            var faults = NoFaults;
            NoteFaults(r, e, ref faults);
            ThrowIfFaulted(faults);
            w.Position = r;
            w.Energy = e;
            w.Jacobian = _radial ? TOps.Multiply(r, r) : TOps.Broadcast(1.0);
        }

        internal TD WidthFrom(TD logWidth) => LaneAdaptation.Width<TOps, TD, TB>(logWidth, _maxWidth);

        [MethodImpl(MethodImplOptions.AggressiveInlining)]
        private TD Energy(TD r) => LaneEnergy.AtDistance<TOps, TD, TB, TPotential>(_potential, r);

        [MethodImpl(MethodImplOptions.AggressiveInlining)]
        private static void NoteFaults(TD r, TD e, ref LaneFaults<TD> faults) => LaneFaultCheck.Note<TOps, TD, TB>(ref faults, r, e);

        private void ThrowIfFaulted(in LaneFaults<TD> faults) => LaneFaultCheck.ThrowIfAny<TOps, TD, TB>(faults, _potential.Description);

        private static LaneFaults<TD> NoFaults => LaneFaultCheck.None<TOps, TD, TB>();

        /// <summary>One step in every lane; returns the acceptance mask. State comes as separate locals so that it stays in registers.</summary>
        [MethodImpl(MethodImplOptions.AggressiveInlining)]
        private TD Step(ref TD position, ref TD energy, ref TD jacobian, ref TB r0, ref TB r1, ref TB r2, ref TB r3, TD width, ref LaneFaults<TD> faults)
        {
            var u1 = LaneMath.NextUnit<TOps, TD, TB>(ref r0, ref r1, ref r2, ref r3);
            var u2 = LaneMath.NextUnit<TOps, TD, TB>(ref r0, ref r1, ref r2, ref r3);
            var one = TOps.Broadcast(1.0);
            // 2u − (1 − 2^−52): the 52-bit grid of u shifted half a cell, so the offsets are symmetric about 0 and so is the proposal.
            var proposal = TOps.MultiplyAdd(width, TOps.Subtract(TOps.Add(u1, u1), TOps.Broadcast(1.0 - 1.0 / 4503599627370496.0)), position);
            var inside = TOps.And(TOps.LessOrEqual(TOps.Broadcast(_lower), proposal), TOps.LessOrEqual(proposal, TOps.Broadcast(_upper)));
            var candidate = TOps.Select(inside, proposal, position); // outside lanes evaluate the current point and are rejected below
            var candidateEnergy = Energy(candidate);
            NoteFaults(candidate, candidateEnergy, ref faults);
            var ratio = LaneMath.Exp<TOps, TD, TB>(TOps.Multiply(TOps.Broadcast(-_beta), TOps.Subtract(candidateEnergy, energy)));
            TD accept;
            if (_radial)
            {
                var candidateJacobian = TOps.Multiply(candidate, candidate);
                accept = TOps.And(inside, TOps.LessThan(TOps.Multiply(u2, jacobian), TOps.Multiply(candidateJacobian, ratio)));
                jacobian = TOps.Select(accept, candidateJacobian, jacobian);
            }
            else
            {
                accept = TOps.And(inside, TOps.LessThan(u2, ratio));
            }
            position = TOps.Select(accept, candidate, position);
            energy = TOps.Select(accept, candidateEnergy, energy);
            return accept;
        }

        /// <summary>Burn-in: steps with each lane's adapting width; returns the log widths reached.</summary>
        internal TD BurnIn(ref Walk<TD, TB> w, TD logWidth, long steps, ProgressReporter[] reporters, CancellationToken ct)
        {
            var gains = new double[ChunkSteps];
            for (long i = 0; i < steps; i += ChunkSteps)
            {
                LaneAdaptation.AtChunkBoundary(reporters, i, ct);
                int chunk = (int)Math.Min(ChunkSteps, steps - i);
                LaneAdaptation.FillGains(gains, i, chunk);
                w.Faults = NoFaults;
                logWidth = AdaptChunk(ref w, logWidth, gains, chunk);
                ThrowIfFaulted(w.Faults);
            }
            return logWidth;
        }

        /// <summary>
        /// One chunk of burn-in. A separate method with no calls inside, so that the JIT keeps the whole walk in
        /// registers (any call in the loop would force every vector register to memory: they are all caller-saved).
        /// </summary>
        [MethodImpl(MethodImplOptions.NoInlining | MethodImplOptions.AggressiveOptimization)]
        private TD AdaptChunk(ref Walk<TD, TB> walk, TD logWidth, double[] gains, int chunk)
        {
            TD position = walk.Position, energy = walk.Energy, jacobian = walk.Jacobian;
            TB r0 = walk.R0, r1 = walk.R1, r2 = walk.R2, r3 = walk.R3;
            var faults = walk.Faults;
            var logMax = TOps.Broadcast(Math.Log(_maxWidth));
            for (int j = 0; j < chunk; j++)
            {
                var accept = Step(ref position, ref energy, ref jacobian, ref r0, ref r1, ref r2, ref r3, WidthFrom(logWidth), ref faults);
                logWidth = LaneAdaptation.Update<TOps, TD, TB>(logWidth, accept, _target, gains[j], logMax);
            }
            walk.Position = position;
            walk.Energy = energy;
            walk.Jacobian = jacobian;
            walk.R0 = r0;
            walk.R1 = r1;
            walk.R2 = r2;
            walk.R3 = r3;
            walk.Faults = faults;
            return logWidth;
        }

        /// <summary>
        /// The recorded phase: steps with the frozen width; each lane's positions go to its chain's record. Chunks end at
        /// moment-block and progress boundaries (every 4096 steps), where the bookkeeping that makes calls happens; batches
        /// close inside the chunk.
        /// </summary>
        internal void Record(ref Walk<TD, TB> w, TD width, long burnIn, long samples, PairChainRecord[] records, ProgressReporter[] reporters, CancellationToken ct)
        {
            var zero = TOps.Broadcast(0.0);
            var records0 = records[0];
            int batchSize = records0.Store.BatchSize;
            var tally = new Tally(records0, TOps.Count, records.Length);
            int inBlock = 0, inBatch = 0;
            w.S1 = w.S2 = w.S3 = w.S4 = w.B1 = w.B2 = w.Accepted = zero;
            w.BlockReference = w.Position;
            long i = 0;
            while (i < samples)
            {
                if ((i & (ChunkSteps - 1)) == 0)
                {
                    LaneAdaptation.AtChunkBoundary(reporters, burnIn + i, ct);
                }
                // Up to the next boundary of a moment block or a progress chunk; batches close inside the chunk.
                int chunk = (int)Math.Min(BlockedMomentAccumulator.BlockSize - inBlock, Math.Min(samples - i, ChunkSteps - (i & (ChunkSteps - 1))));
                w.Faults = NoFaults;
                int closed = RecordChunk(ref w, width, chunk, i, ref inBatch, batchSize, tally);
                ThrowIfFaulted(w.Faults);
                for (int k = 0; k < closed; k++)
                {
                    for (int lane = 0; lane < records.Length; lane++)
                    {
                        records[lane].Store.AddBatchSums(tally.BatchSums[2 * k * TOps.Count + lane], tally.BatchSums[(2 * k + 1) * TOps.Count + lane]);
                    }
                }
                i += chunk;
                inBlock += chunk;
                if (inBlock == BlockedMomentAccumulator.BlockSize || i == samples)
                {
                    for (int lane = 0; lane < records.Length; lane++)
                    {
                        records[lane].AddMomentBlock(inBlock, TOps.Get(w.BlockReference, lane), TOps.Get(w.S1, lane), TOps.Get(w.S2, lane),
                            TOps.Get(w.S3, lane), TOps.Get(w.S4, lane));
                    }
                    w.S1 = w.S2 = w.S3 = w.S4 = zero;
                    w.BlockReference = w.Position;
                    inBlock = 0;
                }
            }
            tally.CopyTo(records, samples);
        }

        /// <summary>
        /// One chunk of the recorded phase; like <see cref="AdaptChunk"/>, a separate method with no calls inside. Batches
        /// that close inside the chunk leave their sums in <see cref="LaneTally.BatchSums"/>; returns how many closed.
        /// </summary>
        [MethodImpl(MethodImplOptions.NoInlining | MethodImplOptions.AggressiveOptimization)]
        private int RecordChunk(ref Walk<TD, TB> walk, TD width, int chunk, long done, ref int inBatch, int batchSize, Tally tally)
        {
            int closed = 0, filled = inBatch;
            var batchSums = tally.BatchSums;
            TD position = walk.Position, energy = walk.Energy, jacobian = walk.Jacobian;
            TB r0 = walk.R0, r1 = walk.R1, r2 = walk.R2, r3 = walk.R3;
            TD accepted = walk.Accepted, s1 = walk.S1, s2 = walk.S2, s3 = walk.S3, s4 = walk.S4, b1 = walk.B1, b2 = walk.B2;
            var faults = walk.Faults;
            var blockReference = walk.BlockReference;
            var one = TOps.Broadcast(1.0);
            var zero = TOps.Broadcast(0.0);
            var batchReference = TOps.Broadcast(tally.BatchReference);
            var binLower = TOps.Broadcast(tally.BinLower);
            var binScale = TOps.Broadcast(tally.BinScale);
            var counts = tally.Counts;
            var scaled = tally.Scratch;
            var kept = tally.Kept;
            long keptStride = tally.Retained;
            int lanes = tally.Lanes;
            var binCount = TOps.Broadcast(tally.Bins);
            var lastBin = TOps.Broadcast(tally.Bins - 1);
            var laneOffsets = TOps.BroadcastBits(0);
            for (int lane = 0; lane < TOps.Count; lane++)
            {
                laneOffsets = TOps.SetBits(laneOffsets, lane, (ulong)(Math.Min(lane, lanes - 1) * tally.Bins)); // padding lanes are never counted
            }
            var index = tally.Index;
            long retain = Math.Max(0, Math.Min(chunk, tally.Retained - done)); // the first steps of the chain may be kept raw
            for (int j = 0; j < chunk; j++)
            {
                var accept = Step(ref position, ref energy, ref jacobian, ref r0, ref r1, ref r2, ref r3, width, ref faults);
                accepted = TOps.Add(accepted, TOps.Select(accept, one, zero));
                var x = position;

                // Raw power sums about the position before the block (converted as BlockedMomentAccumulator does).
                var d = TOps.Subtract(x, blockReference);
                var d2 = TOps.Multiply(d, d);
                s1 = TOps.Add(s1, d);
                s2 = TOps.Add(s2, d2);
                s3 = TOps.Add(s3, TOps.Multiply(d2, d));
                s4 = TOps.Add(s4, TOps.Multiply(d2, d2));

                // Batch sums of x − ref and (x − ref)² (BatchMeansStore's rule).
                var b = TOps.Subtract(x, batchReference);
                b1 = TOps.Add(b1, b);
                b2 = TOps.Add(b2, TOps.Multiply(b, b));
                if (++filled == batchSize)
                {
                    TOps.Store(b1, ref batchSums[2 * closed * TOps.Count]);
                    TOps.Store(b2, ref batchSums[(2 * closed + 1) * TOps.Count]);
                    closed++;
                    filled = 0;
                    b1 = b2 = zero;
                }

                // Histogram: x is inside the window, so t = (x − lower)·scale is in [0, bins]; t = bins (the upper wall) goes to
                // the last bin. The flat index lane·bins + ⌊t⌋ is formed in the vector; only the increments are per lane.
                var t = TOps.Multiply(TOps.Subtract(x, binLower), binScale);
                t = TOps.Select(TOps.LessThan(t, binCount), t, lastBin);
                TOps.StoreBits(TOps.AddBits(TOps.Truncate(t), laneOffsets), ref index[0]);
                for (int lane = 0; lane < lanes; lane++)
                {
                    counts[index[lane]]++;
                }
                if (j < retain)
                {
                    TOps.Store(x, ref scaled[0]);
                    for (int lane = 0; lane < lanes; lane++)
                    {
                        kept[lane * keptStride + done + j] = scaled[lane];
                    }
                }
            }
            walk.Position = position;
            walk.Energy = energy;
            walk.Jacobian = jacobian;
            walk.R0 = r0;
            walk.R1 = r1;
            walk.R2 = r2;
            walk.R3 = r3;
            walk.Accepted = accepted;
            walk.S1 = s1;
            walk.S2 = s2;
            walk.S3 = s3;
            walk.S4 = s4;
            walk.B1 = b1;
            walk.B2 = b2;
            walk.Faults = faults;
            inBatch = filled;
            return closed;
        }
    }

    /// <summary>The histogram counts and retained draws of a lane group, in flat arrays the inner loop can reach without calls.</summary>
    private sealed class Tally(PairChainRecord first, int width, int lanes) : LaneTally(first.Bins, first.Draws.Capacity, width, lanes, 1)
    {
        internal double BatchReference { get; } = first.Store.Reference;

        internal double BinLower { get; } = first.Bins.Lower;

        internal void CopyTo(PairChainRecord[] records, long samples)
        {
            long kept = Math.Min(samples, Retained);
            for (int lane = 0; lane < Lanes; lane++)
            {
                records[lane].Bins.AddCounts(Counts.AsSpan(lane * Bins, Bins));
                for (long k = 0; k < kept; k++)
                {
                    records[lane].Draws.Add(Kept[lane * Retained + k]);
                }
            }
        }
    }

    /// <summary>The running state of every lane of a group: position, energy, Jacobian, random stream, sums and faults.</summary>
    private struct Walk<TD, TB>
        where TD : struct
        where TB : struct
    {
        internal TD Position, Energy, Jacobian;
        internal TB R0, R1, R2, R3;
        internal TD Accepted, S1, S2, S3, S4, B1, B2, BlockReference;
        internal LaneFaults<TD> Faults;
    }
}
